import type { FeatureDeps } from '../../deps';
import { secureRouter } from '../../http/routes';
import { idParamsSchema } from '../../../shared/schemas/common';
import {
  approveFindingSchema,
  attachEvidenceSchema,
  commentSchema,
  createFindingSchema,
  evidenceParamsSchema,
  findingListQuerySchema,
  returnFindingSchema,
  revisionParamsSchema,
  updateFindingSchema,
} from '../../../shared/schemas/findings';
import { createFindingsService } from './findings.service';

export function findingsRoutes(deps: FeatureDeps, signingLimit: { windowMs: number; limit: number }) {
  const service = createFindingsService(deps, signingLimit);
  const r = secureRouter();

  r.get('/findings', { access: 'viewer', schemas: { query: findingListQuerySchema } }, ({ query, user }) => service.list(query, user));
  r.post('/findings', { access: 'technician', status: 201, schemas: { body: createFindingSchema } }, ({ user, body }) => ({
    finding: service.create(user, body),
  }));
  r.get('/findings/attachable-views', { access: 'technician' }, () => service.attachable());
  r.get('/findings/:id', { access: 'viewer', schemas: { params: idParamsSchema } }, ({ user, params }) => ({ finding: service.get(params.id, user) }));
  r.patch('/findings/:id', { access: 'technician', schemas: { params: idParamsSchema, body: updateFindingSchema } }, ({ user, params, body }) => ({
    finding: service.update(user, params.id, body),
  }));
  r.get('/findings/:id/revisions', { access: 'viewer', schemas: { params: idParamsSchema } }, ({ params }) => service.revisions(params.id));
  r.get('/findings/:id/revisions/:revision', { access: 'viewer', schemas: { params: revisionParamsSchema } }, ({ params }) =>
    service.revision(params.id, params.revision),
  );
  r.post(
    '/findings/:id/evidence',
    { access: 'technician', status: 201, schemas: { params: idParamsSchema, body: attachEvidenceSchema } },
    ({ user, params, body }) => ({
      finding: service.attach(user, params.id, body.savedViewId),
    }),
  );
  r.delete('/findings/:id/evidence/:evidenceId', { access: 'technician', schemas: { params: evidenceParamsSchema } }, ({ user, params }) => ({
    finding: service.detach(user, params.id, params.evidenceId),
  }));
  r.post('/findings/:id/submit', { access: 'technician', schemas: { params: idParamsSchema } }, async ({ user, params }) => ({
    finding: await service.submit(user, params.id),
  }));
  r.post(
    '/findings/:id/comments',
    { access: 'technician', status: 201, schemas: { params: idParamsSchema, body: commentSchema } },
    async ({ user, params, body }) => ({
      finding: await service.comment(user, params.id, body.bodyMd),
    }),
  );
  r.post('/findings/:id/return', { access: 'reviewer', schemas: { params: idParamsSchema, body: returnFindingSchema } }, async ({ user, params, body }) => ({
    finding: await service.returnFinding(user, params.id, body.reason),
  }));
  r.post('/findings/:id/reopen', { access: 'technician', schemas: { params: idParamsSchema } }, ({ user, params }) => ({
    finding: service.reopen(user, params.id),
  }));
  r.post('/findings/:id/withdraw', { access: 'technician', schemas: { params: idParamsSchema } }, ({ user, params }) => ({
    finding: service.withdraw(user, params.id),
  }));
  r.post('/findings/:id/revise', { access: 'technician', status: 201, schemas: { params: idParamsSchema } }, ({ user, params }) => ({
    finding: service.revise(user, params.id),
  }));
  r.post('/findings/:id/approve', { access: 'reviewer', schemas: { params: idParamsSchema, body: approveFindingSchema } }, async ({ user, params, body }) => ({
    finding: await service.approve(user, params.id, body),
  }));
  r.get('/findings/:id/verify', { access: 'viewer', schemas: { params: idParamsSchema } }, ({ params }) => ({ verification: service.verify(params.id) }));

  return r;
}
