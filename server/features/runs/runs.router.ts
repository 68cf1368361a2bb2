import type { FeatureDeps } from '../../deps';
import { secureRouter } from '../../http/routes';
import { idParamsSchema } from '../../../shared/schemas/common';
import { benchQuerySchema, createRunSchema, recordStageSchema, runExportQuerySchema, runListQuerySchema, updateRunSchema } from '../../../shared/schemas/runs';
import { optionsQuerySchema } from '../../../shared/schemas/options';
import { sendCsv } from '../../http/csv-export';
import { runOptions } from './runs.repo';
import { correctStageSchema, runStageParamsSchema } from '../../../shared/schemas/runs';
import { createStageCorrections } from './stage-corrections';
import { createBenchService } from './bench.service';
import { createAnswerMemo } from '../../http/answer-memo';
import { createRunsService } from './runs.service';

/** Runs (chamber cycles), their stages and gauge readings, rule checks, and the bench's to-do list. */
export function runsRoutes(deps: FeatureDeps) {
  const service = createRunsService(deps);
  const bench = createBenchService(deps);
  // The run list and Bench are polled; their answers depend on the clock (due times, lot age) as well.
  const remembered = createAnswerMemo(deps.database.db, { perMinute: true, max: 200 });
  const corrections = createStageCorrections(deps);
  const r = secureRouter();

  r.get('/runs', { access: 'viewer', schemas: { query: runListQuerySchema } }, ({ query }) =>
    remembered(`runs|${JSON.stringify(query)}`, deps.now(), () => service.list(query)),
  );
  // Declared before /runs/:id so "export.csv" and "options" are never taken for an id.
  r.get('/runs/export.csv', { access: 'viewer', schemas: { query: runExportQuerySchema } }, ({ query, res }) =>
    sendCsv(res, 'runs.csv', service.exportRows(query)),
  );
  r.get('/runs/options', { access: 'viewer', schemas: { query: optionsQuerySchema } }, ({ query }) => ({ items: runOptions(deps.database.db, query) }));
  r.post('/runs', { access: 'technician', status: 201, schemas: { body: createRunSchema } }, ({ user, body }) => ({ run: service.create(user, body) }));
  r.get('/runs/:id', { access: 'viewer', schemas: { params: idParamsSchema } }, ({ user, params }) => ({ run: service.get(params.id, user.units) }));
  r.patch('/runs/:id', { access: 'technician', schemas: { params: idParamsSchema, body: updateRunSchema } }, ({ user, params, body }) => ({
    run: service.update(user, params.id, body),
  }));
  r.post('/runs/:id/stages', { access: 'technician', schemas: { params: idParamsSchema, body: recordStageSchema } }, ({ user, params, body }) => ({
    run: service.recordStage(user, params.id, body),
  }));
  // A recorded stage's times, readings and temperatures change only through a correction with a reason.
  r.post(
    '/runs/:id/stages/:stage/corrections',
    { access: 'technician', schemas: { params: runStageParamsSchema, body: correctStageSchema } },
    ({ user, params, body }) => {
      corrections.correct(user, params.id, params.stage, body);
      return { run: service.get(params.id, user.units) };
    },
  );
  r.get('/runs/:id/history', { access: 'viewer', schemas: { params: idParamsSchema } }, ({ params }) => corrections.history(params.id));
  r.get('/runs/:id/checks', { access: 'viewer', schemas: { params: idParamsSchema } }, ({ user, params }) => service.checks(params.id, user.units));
  r.get('/bench', { access: 'viewer', schemas: { query: benchQuerySchema } }, ({ query }) =>
    remembered(`bench|${JSON.stringify(query)}`, deps.now(), () => bench.bench(query)),
  );
  return r;
}
