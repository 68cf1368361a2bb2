import type { FeatureDeps } from '../../deps';
import { secureRouter } from '../../http/routes';
import { idParamsSchema } from '../../../shared/schemas/common';
import {
  batchMeasurementsSchema,
  checkInputSchema,
  correctCheckSchema,
  correctWeighingSchema,
  couponExportQuerySchema,
  couponListQuerySchema,
  createCouponSchema,
  deleteMeasurementSchema,
  updateCouponSchema,
  weighingInputSchema,
} from '../../../shared/schemas/coupons';
import { sendCsv } from '../../http/csv-export';
import { createCouponsService } from './coupons.service';
import { createPhotoService } from './photos.service';
import { createAnswerMemo } from '../../http/answer-memo';

/** Coupons, their weighings and checks (with corrections, deletions and history), and photos. */
export function couponsRoutes(deps: FeatureDeps) {
  const service = createCouponsService(deps);
  const photos = createPhotoService(deps);
  const r = secureRouter();
  const id = { params: idParamsSchema };

  // A page of the list is remembered as its JSON text until the next write (decision 0018): the first page
  // of a filter or sort is read by everyone who opens it; a page after a write costs its query again.
  const remembered = createAnswerMemo(deps.database.db, { max: 200 });
  r.get('/coupons', { access: 'viewer', schemas: { query: couponListQuerySchema } }, ({ query }) =>
    remembered(`coupons|${JSON.stringify(query)}`, deps.now(), () => service.list(query)),
  );
  // The same page with each coupon's full answer (readings, warnings, ASE): the entry grid and the run's checks need them.
  // Declared before /coupons/:id so "full" is never taken for an id.
  r.get('/coupons/full', { access: 'viewer', schemas: { query: couponListQuerySchema } }, ({ query }) => service.listFull(query));
  r.post('/coupons', { access: 'technician', status: 201, schemas: { body: createCouponSchema } }, ({ user, body }) => ({
    coupon: service.create(user, body),
  }));
  r.get('/coupons/export.csv', { access: 'viewer', schemas: { query: couponExportQuerySchema } }, ({ query, res }) =>
    sendCsv(res, 'coupons.csv', service.exportRows(query)),
  );
  // Declared before /coupons/:id so "measurements" (and "export.csv") is never taken for an id.
  r.post('/coupons/measurements', { access: 'technician', status: 201, schemas: { body: batchMeasurementsSchema } }, ({ user, body }) =>
    service.batch(user, body),
  );
  r.get('/coupons/:id', { access: 'viewer', schemas: id }, ({ params }) => ({ coupon: service.get(params.id) }));
  r.patch('/coupons/:id', { access: 'technician', schemas: { ...id, body: updateCouponSchema } }, ({ user, params, body }) => ({
    coupon: service.update(user, params.id, body),
  }));
  r.post('/coupons/:id/weighings', { access: 'technician', status: 201, schemas: { ...id, body: weighingInputSchema } }, ({ user, params, body }) =>
    service.addWeighing(user, params.id, body),
  );
  r.post('/coupons/:id/checks', { access: 'technician', status: 201, schemas: { ...id, body: checkInputSchema } }, ({ user, params, body }) =>
    service.addCheck(user, params.id, body),
  );
  r.get('/coupons/:id/history', { access: 'viewer', schemas: id }, ({ params }) => service.history(params.id));

  r.patch('/weighings/:id', { access: 'technician', schemas: { ...id, body: correctWeighingSchema } }, ({ user, params, body }) =>
    service.correctWeighing(user, params.id, body),
  );
  r.delete('/weighings/:id', { access: 'technician', schemas: { ...id, body: deleteMeasurementSchema } }, ({ user, params, body }) =>
    service.deleteWeighing(user, params.id, body.reason),
  );
  r.patch('/checks/:id', { access: 'technician', schemas: { ...id, body: correctCheckSchema } }, ({ user, params, body }) =>
    service.correctCheck(user, params.id, body),
  );
  r.delete('/checks/:id', { access: 'technician', schemas: { ...id, body: deleteMeasurementSchema } }, ({ user, params, body }) =>
    service.deleteCheck(user, params.id, body.reason),
  );

  // Photos live with the coupons' records; a run's photos use the same store.
  r.post('/coupons/:id/photos', { access: 'technician', status: 201, schemas: id }, ({ user, params, req, res }) =>
    photos.upload(user, { couponId: params.id }, req, res),
  );
  r.post('/runs/:id/photos', { access: 'technician', status: 201, schemas: id }, ({ user, params, req, res }) =>
    photos.upload(user, { runId: params.id }, req, res),
  );
  r.get('/photos/:id', { access: 'viewer', schemas: id }, async ({ params, res }) => {
    await photos.serve(params.id, res);
  });
  return r;
}
