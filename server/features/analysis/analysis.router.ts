import type { FeatureDeps } from '../../deps';
import { JsonText, secureRouter } from '../../http/routes';
import { idParamsSchema, listQuerySchema } from '../../../shared/schemas/common';
import {
  analysisCouponsQuerySchema,
  analysisQuerySchema,
  compareRequestSchema,
  createEvidenceSchema,
  fitQuerySchema,
  sampleSizeQuerySchema,
  summaryQuerySchema,
} from '../../../shared/schemas/analysis';
import { createAnalysisService } from './analysis.service';

/** Split a parsed query into the filters and the rest. */
function split<T extends Record<string, unknown>, K extends string>(q: T, keys: readonly K[]) {
  const rest = { ...q };
  const picked: Record<string, unknown> = {};
  for (const k of keys) {
    picked[k] = rest[k];
    delete rest[k];
  }
  return { filters: rest as Omit<T, K>, picked: picked as Pick<T, K & keyof T> };
}

export function analysisRoutes(deps: FeatureDeps) {
  const service = createAnalysisService({ db: deps.database.db, now: deps.now });
  const r = secureRouter();
  // The service hands back the same answer object while the data are unchanged (it remembers answers per
  // data version), so its JSON text and gzip are made once per object: an overview over a whole shop is
  // about 1.4 MB of JSON, some 80 ms to stringify and compress on every request otherwise.
  const texts = new WeakMap<object, JsonText>();
  const asText = (answer: object): JsonText => {
    let text = texts.get(answer);
    if (!text) {
      text = new JsonText(JSON.stringify(answer));
      texts.set(answer, text);
    }
    return text;
  };

  // Everything the Compare screen shows, in one pass over the results rows.
  r.get('/analysis/overview', { access: 'viewer', schemas: { query: analysisQuerySchema } }, ({ query }) => {
    const { filters, picked } = split(query, ['sgBasis'] as const);
    return asText(service.overview(filters, picked.sgBasis));
  });
  r.get('/analysis/summary', { access: 'viewer', schemas: { query: summaryQuerySchema } }, ({ query }) => {
    const { filters, picked } = split(query, ['sgBasis', 'groupBy'] as const);
    const o = service.overview(filters, picked.sgBasis);
    return { groupBy: picked.groupBy, groups: o.groups, counts: o.counts, excluded: o.excluded };
  });
  r.get('/analysis/fit', { access: 'viewer', schemas: { query: fitQuerySchema } }, ({ query }) => {
    const { filters, picked } = split(query, ['sgBasis', 'model'] as const);
    return service.fit(filters, picked.sgBasis, picked.model);
  });
  r.get('/analysis/coupons', { access: 'viewer', schemas: { query: analysisCouponsQuerySchema } }, ({ query }) => {
    const { filters, picked } = split(query, ['page', 'pageSize'] as const);
    return service.coupons(filters, picked.page, picked.pageSize);
  });
  // A read, but with a body: the two groups are structured.
  r.post('/analysis/compare', { access: 'viewer', schemas: { body: compareRequestSchema } }, ({ body }) =>
    asText(service.compare(body.filters, body.a, body.b, body.metric)),
  );
  r.get('/analysis/runs/:id/expected', { access: 'viewer', schemas: { params: idParamsSchema } }, ({ params }) => service.runExpected(params.id));
  r.get('/analysis/sample-size', { access: 'viewer', schemas: { query: sampleSizeQuerySchema } }, ({ query }) => service.sampleSize(query));

  r.get('/evidence', { access: 'viewer', schemas: { query: listQuerySchema } }, ({ query }) => service.evidenceList(query.page, query.pageSize));
  r.post('/evidence', { access: 'technician', status: 201, schemas: { body: createEvidenceSchema } }, ({ user, body }) => service.saveEvidence(user, body));
  r.get('/evidence/:id', { access: 'viewer', schemas: { params: idParamsSchema } }, ({ params }) => service.getEvidence(params.id));

  return r;
}
