import { rateLimit } from 'express-rate-limit';
import type { FeatureDeps } from '../../deps';
import { AppError } from '../../http/errors';
import { secureRouter } from '../../http/routes';
import type { AuthedRequest } from '../../http/types';
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
  const service = createFindingsService(deps);
  const r = secureRouter();

  // Failed signatures (a wrong password) are counted per signer and limited like sign-in attempts;
  // successful ones and refusals for other reasons do not count.
  r.router.use(
    '/findings/:id/approve',
    rateLimit({
      windowMs: signingLimit.windowMs,
      limit: signingLimit.limit,
      standardHeaders: 'draft-8',
      legacyHeaders: false,
      identifier: 'signing',
      keyGenerator: (req) => `signer:${(req as AuthedRequest).user?.id ?? 'anonymous'}`,
      requestWasSuccessful: (_req, res) => res.locals.signatureRefused !== true,
      skipSuccessfulRequests: true,
      handler: (_req, _res, next) => next(new AppError('rate_limited', 'Too many failed signing attempts; wait a few minutes and try again')),
    }),
  );

  r.get('/findings', { access: 'viewer', schemas: { query: findingListQuerySchema } }, ({ query, user }) => service.list(query, user));
  r.post('/findings', { access: 'technician', status: 201, schemas: { body: createFindingSchema } }, ({ user, body }) => ({ finding: service.create(user, body) }));
  r.get('/findings/attachable-views', { access: 'technician' }, () => service.attachable());
  r.get('/findings/:id', { access: 'viewer', schemas: { params: idParamsSchema } }, ({ user, params }) => ({ finding: service.get(params.id, user) }));
  r.patch('/findings/:id', { access: 'technician', schemas: { params: idParamsSchema, body: updateFindingSchema } }, ({ user, params, body }) => ({
    finding: service.update(user, params.id, body),
  }));
  r.get('/findings/:id/revisions', { access: 'viewer', schemas: { params: idParamsSchema } }, ({ params }) => service.revisions(params.id));
  r.get('/findings/:id/revisions/:revision', { access: 'viewer', schemas: { params: revisionParamsSchema } }, ({ params }) => service.revision(params.id, params.revision));
  r.post('/findings/:id/evidence', { access: 'technician', status: 201, schemas: { params: idParamsSchema, body: attachEvidenceSchema } }, ({ user, params, body }) => ({
    finding: service.attach(user, params.id, body.savedViewId),
  }));
  r.delete('/findings/:id/evidence/:evidenceId', { access: 'technician', schemas: { params: evidenceParamsSchema } }, ({ user, params }) => ({
    finding: service.detach(user, params.id, params.evidenceId),
  }));
  r.post('/findings/:id/submit', { access: 'technician', schemas: { params: idParamsSchema } }, async ({ user, params }) => ({ finding: await service.submit(user, params.id) }));
  r.post('/findings/:id/comments', { access: 'technician', status: 201, schemas: { params: idParamsSchema, body: commentSchema } }, async ({ user, params, body }) => ({
    finding: await service.comment(user, params.id, body.bodyMd),
  }));
  r.post('/findings/:id/return', { access: 'reviewer', schemas: { params: idParamsSchema, body: returnFindingSchema } }, async ({ user, params, body }) => ({
    finding: await service.returnFinding(user, params.id, body.reason),
  }));
  r.post('/findings/:id/reopen', { access: 'technician', schemas: { params: idParamsSchema } }, ({ user, params }) => ({ finding: service.reopen(user, params.id) }));
  r.post('/findings/:id/withdraw', { access: 'technician', schemas: { params: idParamsSchema } }, ({ user, params }) => ({ finding: service.withdraw(user, params.id) }));
  r.post('/findings/:id/revise', { access: 'technician', status: 201, schemas: { params: idParamsSchema } }, ({ user, params }) => ({ finding: service.revise(user, params.id) }));
  r.post('/findings/:id/approve', { access: 'reviewer', schemas: { params: idParamsSchema, body: approveFindingSchema } }, async ({ user, params, body, res }) => {
    try {
      return { finding: await service.approve(user, params.id, body) };
    } catch (err) {
      if (err instanceof AppError && err.fieldErrors?.password) res.locals.signatureRefused = true;
      throw err;
    }
  });
  r.get('/findings/:id/verify', { access: 'viewer', schemas: { params: idParamsSchema } }, ({ params }) => ({ verification: service.verify(params.id) }));

  return r;
}
