import { rateLimit } from 'express-rate-limit';
import type { Request } from 'express';
import type { FeatureDeps } from '../../deps';
import { secureRouter } from '../../http/routes';
import { AppError } from '../../http/errors';
import {
  acceptedResponseSchema,
  invitationAcceptSchema,
  invitationTokenParamsSchema,
  loginSchema,
  passwordResetConfirmSchema,
  passwordResetRequestSchema,
  updatePreferencesSchema,
} from '../../../shared/schemas/auth';
import { inviteUserSchema, updateUserSchema } from '../../../shared/schemas/admin';
import { idParamsSchema, listQuerySchema } from '../../../shared/schemas/common';
import { createAuthService } from './auth.service';
import { createLoginThrottle, type LoginLimits } from './login-throttle';

function regenerate(req: Request): Promise<void> {
  return new Promise((resolve, reject) => req.session.regenerate((err) => (err ? reject(err) : resolve())));
}
function save(req: Request): Promise<void> {
  return new Promise((resolve, reject) => req.session.save((err) => (err ? reject(err) : resolve())));
}
function destroy(req: Request): Promise<void> {
  return new Promise((resolve, reject) => req.session.destroy((err) => (err ? reject(err) : resolve())));
}

/**
 * With an https APP_URL the session cookie is Secure, and neither express-session nor a browser keeps
 * it on a plain-http request: the sign-in would "succeed" with no cookie. Say why instead.
 */
function requireSecureWhenConfigured(deps: FeatureDeps, req: Request) {
  if (!deps.config.appUrl.startsWith('https://') || req.secure) return;
  throw new AppError(
    'forbidden',
    `This server's address is ${deps.config.appUrl}, but this request came over plain http, so no browser would keep the sign-in cookie. ` +
      'Open the https address; if a proxy in front of the server handles https, name it in TRUST_PROXY so its X-Forwarded-Proto is believed.',
  );
}

/** Starts a fresh session for the user; a new id at sign-in defeats session fixation. */
async function signIn(req: Request, userId: number) {
  await regenerate(req);
  req.session.userId = userId;
  await save(req);
}

export const SESSION_COOKIE = 'lumenbook.sid';

export function authRoutes(deps: FeatureDeps, limits: LoginLimits) {
  const service = createAuthService(deps);
  const r = secureRouter();

  const limiter = (name: string) =>
    rateLimit({
      windowMs: limits.windowMs,
      limit: limits.limit,
      standardHeaders: 'draft-8',
      legacyHeaders: false,
      identifier: name,
      handler: (_req, _res, next) => next(new AppError('rate_limited', 'Too many attempts; wait a few minutes and try again')),
    });
  r.router.use('/auth/password-reset', limiter('password-reset'));

  const throttle = createLoginThrottle(deps, limits);
  const address = (req: Request) => req.ip ?? req.socket.remoteAddress ?? 'unknown';

  r.post('/auth/login', { access: 'public', schemas: { body: loginSchema } }, async ({ body, req }) => {
    requireSecureWhenConfigured(deps, req);
    throttle.check(body.email, address(req));
    let user;
    try {
      user = await service.verifyLogin(body.email, body.password);
    } catch (err) {
      throttle.failed(body.email, address(req));
      throw err;
    }
    throttle.succeeded(body.email);
    await signIn(req, user.id);
    deps.logger.info({ userId: user.id }, 'signed in');
    return { user };
  });

  r.post('/auth/logout', { access: 'public' }, async ({ req, res }) => {
    if (req.session) await destroy(req);
    res.clearCookie(SESSION_COOKIE, { path: '/' });
    res.status(204).end();
  });

  r.get('/auth/me', { access: 'viewer' }, ({ user }) => ({ user }));

  r.patch('/auth/me', { access: 'viewer', schemas: { body: updatePreferencesSchema } }, ({ user, body }) => ({
    user: service.updatePreferences(user.id, body),
  }));

  r.post('/auth/password-reset', { access: 'public', schemas: { body: passwordResetRequestSchema }, status: 202 }, async ({ body }) => {
    await service.requestPasswordReset(body.email);
    return acceptedResponseSchema.parse({ accepted: true });
  });

  r.post('/auth/password-reset/confirm', { access: 'public', schemas: { body: passwordResetConfirmSchema } }, async ({ body }) => {
    await service.confirmPasswordReset(body.token, body.password);
    return { accepted: true };
  });

  // Before accepting: the page greets the invited person by the name the admin typed.
  r.get('/auth/invitations/:token', { access: 'public', schemas: { params: invitationTokenParamsSchema } }, ({ params }) => ({
    invitation: service.previewInvitation(params.token),
  }));

  r.post('/auth/invitations/accept', { access: 'public', schemas: { body: invitationAcceptSchema } }, async ({ body, req }) => {
    requireSecureWhenConfigured(deps, req);
    const user = await service.acceptInvitation(body.token, body.password, body.name);
    await signIn(req, user.id);
    return { user };
  });

  // Users (admin). They live with auth because they share the user, token and session records.
  r.get('/users', { access: 'admin', schemas: { query: listQuerySchema } }, ({ query }) => service.listUsers(query));

  r.post('/users/invitations', { access: 'admin', schemas: { body: inviteUserSchema }, status: 201 }, async ({ user, body }) => ({
    user: await service.invite(user, body),
  }));

  r.patch('/users/:id', { access: 'admin', schemas: { params: idParamsSchema, body: updateUserSchema } }, ({ user, params, body }) => ({
    user: service.updateUser(user, params.id, body),
  }));

  return r;
}
