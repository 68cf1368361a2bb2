import type { FeatureDeps } from '../../deps';
import { secureRouter } from '../../http/routes';
import { slugParamsSchema, wikiQuerySchema } from '../../../shared/schemas/wiki';
import { createWikiService } from './wiki.service';

export function wikiRoutes(deps: FeatureDeps) {
  const service = createWikiService(deps);
  const r = secureRouter();

  r.get('/wiki', { access: 'viewer', schemas: { query: wikiQuerySchema } }, ({ query }) => service.list(query));
  // Page slugs always end in the series number, so "index" never names a page.
  r.get('/wiki/index', { access: 'viewer' }, () => service.index());
  r.get('/wiki/:slug', { access: 'viewer', schemas: { params: slugParamsSchema } }, ({ params }) => ({ page: service.get(params.slug) }));
  r.get('/wiki/:slug/export', { access: 'viewer', schemas: { params: slugParamsSchema } }, async ({ params, res }) => {
    const { fileName, data } = await service.exportArchive(params.slug);
    res.setHeader('Content-Type', 'application/gzip');
    res.setHeader('Content-Disposition', `attachment; filename="${fileName}"`);
    res.send(data);
  });

  return r;
}
