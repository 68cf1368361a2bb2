import type { FeatureDeps } from '../../deps';
import { secureRouter } from '../../http/routes';
import { idParamsSchema } from '../../../shared/schemas/common';
import { createTrialSchema, trialExportQuerySchema, trialListQuerySchema, updateTrialSchema } from '../../../shared/schemas/trials';
import { optionsQuerySchema } from '../../../shared/schemas/options';
import { sendCsv } from '../../http/csv-export';
import { trialOptions } from './trials.repo';
import { createTrialsService } from './trials.service';
import { createAnswerMemo } from '../../http/answer-memo';

export function trialsRoutes(deps: FeatureDeps) {
  const service = createTrialsService({ db: deps.database.db, now: deps.now, appUrl: deps.config.appUrl });
  // The trial list is read far more often than the records change (its progress counts read the results table).
  const remembered = createAnswerMemo(deps.database.db, { max: 200 });
  const r = secureRouter();

  r.get('/trials', { access: 'viewer', schemas: { query: trialListQuerySchema } }, ({ query }) =>
    remembered(`trials|${JSON.stringify(query)}`, deps.now(), () => service.listTrials(query)),
  );
  // Declared before /trials/:id so "export.csv" and "options" are never taken for an id.
  r.get('/trials/export.csv', { access: 'viewer', schemas: { query: trialExportQuerySchema } }, ({ query, res }) =>
    sendCsv(res, 'trials.csv', service.exportRows(query)),
  );
  r.get('/trials/options', { access: 'viewer', schemas: { query: optionsQuerySchema } }, ({ query }) => ({
    items: trialOptions(deps.database.db, query),
  }));
  r.post('/trials', { access: 'technician', status: 201, schemas: { body: createTrialSchema } }, ({ user, body }) => ({
    trial: service.createTrial(user, body),
  }));
  r.get('/trials/:id', { access: 'viewer', schemas: { params: idParamsSchema } }, ({ user, params }) => ({ trial: service.getTrial(params.id, user.units) }));
  r.patch('/trials/:id', { access: 'technician', schemas: { params: idParamsSchema, body: updateTrialSchema } }, ({ user, params, body }) => ({
    trial: service.updateTrial(user, params.id, body),
  }));
  // Safe to repeat: it creates only the planned coupons that are still missing.
  r.post('/trials/:id/coupons', { access: 'technician', schemas: { params: idParamsSchema } }, ({ user, params }) =>
    service.createPlannedCoupons(user, params.id),
  );
  r.get('/trials/:id/labels', { access: 'viewer', schemas: { params: idParamsSchema } }, ({ params }) => service.labels(params.id));

  return r;
}
