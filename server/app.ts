import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import express, { type NextFunction, type Request, type Response } from 'express';
import session from 'express-session';
import compression from 'compression';
import helmet from 'helmet';
import { pinoHttp } from 'pino-http';
import { CSRF_HEADER, CSRF_VALUE } from '../shared/constants/errors';
import type { AppDeps, FeatureDeps } from './deps';
import { probeDatabase } from './db/health';
import { Forbidden } from './http/errors';
import { apiNotFound, errorHandler } from './http/error-handler';
import { secureRouter, type DeclaredRoute, type SecureRouter } from './http/routes';
import { SqliteSessionStore } from './http/session-store';
import { CLIENT_DIR } from './paths';
import type { AuthedRequest } from './http/types';
import { authRoutes, SESSION_COOKIE } from './features/auth/auth.router';
import { findUserById, toUser } from './features/auth/auth.repo';
import { adminRoutes } from './features/admin/admin.router';
import { runsRoutes } from './features/runs/runs.router';
import { couponsRoutes } from './features/coupons/coupons.router';
import { referenceRoutes } from './features/reference/reference.router';
import { trialsRoutes } from './features/trials/trials.router';
import { findingsRoutes } from './features/findings/findings.router';
import { wikiRoutes } from './features/wiki/wiki.router';
import { analysisRoutes } from './features/analysis/analysis.router';
import { importsRoutes } from './features/imports/imports.router';

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);
const REQUEST_ID = /^[A-Za-z0-9._-]{1,64}$/;
/** Body limit of the grid's batch save (POST /api/coupons/measurements); every other JSON body: 100 kB. */
export const BATCH_BODY_LIMIT = '2mb';
/** zlib level of API answers (decision 0018); static files keep the default, 6. */
const API_GZIP_LEVEL = 1;

function originHost(origin: string): string | null {
  try {
    return new URL(origin).host || null;
  } catch {
    return null;
  }
}

/**
 * Builds the Express app from its dependencies. Features are composed here and nowhere else:
 * each contributes a secureRouter mounted under /api.
 */
export function createApp(deps: AppDeps) {
  const sessions = new SqliteSessionStore(deps.database.sqlite);
  const feature: FeatureDeps = {
    config: deps.config,
    database: deps.database,
    mailer: deps.mailer,
    logger: deps.logger,
    now: deps.now ?? (() => new Date()),
    sessions,
    bcryptCost: deps.bcryptCost ?? 12,
  };

  const app = express();
  app.disable('x-powered-by');
  const secureCookie = deps.config.appUrl.startsWith('https://');
  // Only a proxy named in TRUST_PROXY is believed about the client's address and scheme; anyone else's
  // X-Forwarded-For is ignored, so it cannot walk past the sign-in limit.
  app.set('trust proxy', deps.config.trustProxy);

  app.use(
    pinoHttp({
      logger: deps.logger,
      genReqId: (req, res) => {
        const incoming = req.headers['x-request-id'];
        const id = typeof incoming === 'string' && REQUEST_ID.test(incoming) ? incoming : crypto.randomUUID();
        res.setHeader('X-Request-Id', id);
        return id;
      },
      autoLogging: { ignore: (req) => !req.url?.startsWith('/api') },
      // One readable line per request: never the headers, which carry the session cookie (replayable
      // for days), the answer's set-cookie and any authorization.
      serializers: {
        req: (req: { id: unknown; method: string; url: string }) => ({ id: req.id, method: req.method, url: req.url }),
        res: (res: { statusCode: number }) => ({ statusCode: res.statusCode }),
      },
      redact: { paths: ['req.headers.cookie', 'req.headers.authorization', 'res.headers["set-cookie"]'], remove: true },
      customSuccessMessage: (req, res, ms) => `${req.method} ${(req as Request).originalUrl ?? req.url} ${res.statusCode} ${Math.round(ms)} ms`,
      customErrorMessage: (req, res, err) => `${req.method} ${(req as Request).originalUrl ?? req.url} ${res.statusCode} ${err.message}`,
    }),
  );
  // JSON and CSV answers shrink 8–10× with gzip (a Bench or list page of a large shop); small answers
  // (under 1 kB) and images pass as they are. API answers use level 1: measured on a 53 kB Bench answer,
  // 0.17 ms and 6.7 kB against 0.54 ms and 5.4 kB at the default level 6 (a 31 kB list page: 3.7 kB
  // against 3.2 kB), and they are made on every request while static files are few and cached a year.
  app.use('/api', compression({ level: API_GZIP_LEVEL }));
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: { 'img-src': ["'self'", 'data:', 'blob:'], 'upgrade-insecure-requests': secureCookie ? [] : null },
      },
      // Over plain http on localhost, HSTS would only confuse the browser.
      strictTransportSecurity: secureCookie,
    }),
  );
  // The entry grid's batch save takes up to 500 coupons' full rows in one transaction (the contract's
  // maximum): a full row is about 1 KB, the contract's largest entry (20 weighings, 20 checks) about 4 KB,
  // so this one route parses up to 2 MB. Parsed here first, the general parser below leaves it alone.
  app.use('/api/coupons/measurements', express.json({ limit: BATCH_BODY_LIMIT }));
  app.use('/api', express.json({ limit: '100kb' }));
  app.use(
    '/api',
    session({
      name: SESSION_COOKIE,
      secret: deps.config.sessionSecret ?? crypto.randomBytes(32).toString('hex'),
      store: sessions,
      resave: false,
      saveUninitialized: false,
      rolling: false,
      cookie: { httpOnly: true, sameSite: 'lax', secure: secureCookie, maxAge: 7 * 24 * 3600 * 1000, path: '/' },
    }),
  );

  // Who is asking: the session names a user id; a user who was disabled or deleted loses the session.
  app.use('/api', (req: Request, _res: Response, next: NextFunction) => {
    const areq = req as AuthedRequest;
    areq.user = null;
    const userId = req.session?.userId;
    if (userId === undefined) return next();
    const row = findUserById(deps.database.db, userId);
    if (!row || row.disabled) {
      req.session.destroy(() => next());
      return;
    }
    areq.user = toUser(row);
    next();
  });

  // CSRF: cookies are SameSite=Lax, and every write must carry a custom header that a cross-site form
  // cannot send (and a cross-site script cannot send without a CORS preflight we never grant).
  app.use('/api', (req: Request, _res: Response, next: NextFunction) => {
    if (SAFE_METHODS.has(req.method)) return next();
    // X-Requested-With: XMLHttpRequest is accepted too: it is the customary header of the same kind.
    const marked = req.get(CSRF_HEADER) === CSRF_VALUE || req.get('x-requested-with') === 'XMLHttpRequest';
    if (!marked) return next(new Forbidden(`Missing the ${CSRF_HEADER} header on a write request`));
    const origin = req.get('origin');
    // `Origin: null` (sandboxed frames, some redirects) and unparsable origins are refused like foreign ones.
    if (origin !== undefined && originHost(origin) !== req.get('host')) return next(new Forbidden('Cross-origin write refused'));
    next();
  });

  const health = secureRouter();
  // Health is a write, not just an answer: a read-only or full database must not look healthy.
  health.get('/health', { access: 'public' }, ({ res }) => {
    const database = probeDatabase(deps.database, feature.now());
    if (database === 'writable' || database === 'busy') return { ok: true, database };
    res.status(503).json({ ok: false, database });
    return undefined;
  });

  const mounted: SecureRouter[] = [
    health,
    authRoutes(feature, deps.loginRateLimit ?? { windowMs: 15 * 60_000, limit: deps.config.loginRateLimit, perAddress: deps.config.loginRateLimitPerAddress }),
    adminRoutes(feature),
    runsRoutes(feature),
    couponsRoutes(feature),
    referenceRoutes(feature),
    trialsRoutes(feature),
    findingsRoutes(feature, deps.signingRateLimit ?? { windowMs: 15 * 60_000, limit: 5 }),
    wikiRoutes(feature),
    analysisRoutes(feature),
    importsRoutes(feature),
  ];
  const declared: DeclaredRoute[] = [];
  for (const r of mounted) {
    app.use('/api', r.router);
    declared.push(...r.declared.map((d) => ({ ...d, path: `/api${d.path}` })));
  }
  app.use('/api', apiNotFound);

  const clientDir = deps.clientDir ?? CLIENT_DIR;
  if (deps.config.production && fs.existsSync(path.join(clientDir, 'index.html'))) {
    // Source maps (built 'hidden') stay on the server's disk for whoever debugs there; nobody downloads them.
    app.use((req: Request, res: Response, next: NextFunction) => (req.path.endsWith('.map') ? void res.status(404).end() : next()));
    app.use(compression());
    // Vite names every file under /assets by its content hash, so a changed file gets a new name:
    // cached for a year and never revalidated. A missing asset is a 404, never the client's page.
    app.use('/assets', express.static(path.join(clientDir, 'assets'), { index: false, immutable: true, maxAge: '1y' }));
    app.use('/assets', (_req: Request, res: Response) => void res.status(404).end());
    // Everything else (index.html, icons) is revalidated on every load, so a new release shows at once.
    const noCache = (res: Response) => res.setHeader('Cache-Control', 'no-cache');
    app.use(express.static(clientDir, { index: false, setHeaders: noCache }));
    // Single-page fallback: every non-API path gets the client, whose router decides what to show.
    app.get('/{*splat}', (_req, res) => {
      noCache(res);
      res.sendFile(path.join(clientDir, 'index.html'));
    });
  }

  app.use(errorHandler);

  return {
    app,
    sessions,
    declaredRoutes: declared,
    close() {
      sessions.close();
    },
  };
}
export type LumenbookApp = ReturnType<typeof createApp>;
