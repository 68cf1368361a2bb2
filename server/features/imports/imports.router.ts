import type { FeatureDeps } from '../../deps';
import { secureRouter } from '../../http/routes';
import { idParamsSchema, listQuerySchema } from '../../../shared/schemas/common';
import {
  commitImportSchema,
  createPresetSchema,
  importDetailQuerySchema,
  importProblemsQuerySchema,
  previewImportSchema,
  sampleImportSchema,
  undoImportSchema,
} from '../../../shared/schemas/imports';
import { templateCsv } from '../../../shared/imports/template';
import { createImportsService } from './imports.service';

/** Scale files to weighings: upload and detect, sample, preview and commit (polled jobs), undo, history, presets. */
export function importsRoutes(deps: FeatureDeps) {
  const service = createImportsService(deps);
  const r = secureRouter();
  const id = { params: idParamsSchema };

  r.get('/imports', { access: 'viewer', schemas: { query: listQuerySchema } }, ({ query }) => service.list(query));
  r.post('/imports', { access: 'technician', status: 201 }, ({ user, req, res }) => service.upload(user, req, res));
  // Fixed paths before /imports/:id so they are never taken for an id.
  r.get('/imports/template.csv', { access: 'viewer' }, ({ res }) => {
    res.setHeader('Content-Type', 'text/csv; charset=utf-8');
    res.setHeader('Content-Disposition', 'attachment; filename="lumenbook-readings-template.csv"');
    res.status(200).send(templateCsv());
  });
  r.get('/imports/presets', { access: 'viewer' }, () => service.presets());
  r.post('/imports/presets', { access: 'technician', status: 201, schemas: { body: createPresetSchema } }, ({ user, body }) =>
    service.createPreset(user, body),
  );
  r.get('/imports/:id', { access: 'viewer', schemas: { ...id, query: importDetailQuerySchema } }, ({ params, query }) =>
    service.detailAfterJob(params.id, query.wait ?? 0),
  );
  r.get('/imports/:id/problems', { access: 'viewer', schemas: { ...id, query: importProblemsQuerySchema } }, ({ params, query }) =>
    service.problems(params.id, query),
  );
  r.get('/imports/:id/problems.csv', { access: 'viewer', schemas: id }, ({ params, res }) => {
    // Built before any header is set, so a missing import still gets the JSON error envelope.
    const csv = service.problemsCsv(params.id);
    res.setHeader('Content-Type', 'text/csv; charset=utf-8');
    res.setHeader('Content-Disposition', `attachment; filename="import-${params.id}-problems.csv"`);
    res.status(200).send(csv);
  });
  r.post('/imports/:id/sample', { access: 'technician', schemas: { ...id, body: sampleImportSchema } }, ({ params, body }) =>
    service.sample(params.id, body.format),
  );
  r.post('/imports/:id/preview', { access: 'technician', status: 202, schemas: { ...id, body: previewImportSchema } }, ({ params, body }) =>
    service.preview(params.id, body.mapping),
  );
  r.post('/imports/:id/commit', { access: 'technician', status: 202, schemas: { ...id, body: commitImportSchema } }, ({ user, params, body }) =>
    service.commit(user, params.id, body),
  );
  r.post('/imports/:id/undo', { access: 'technician', status: 202, schemas: { ...id, body: undoImportSchema } }, ({ user, params, body }) =>
    service.undo(user, params.id, body.reason),
  );
  return r;
}
