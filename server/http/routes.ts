import crypto from 'node:crypto';
import zlib from 'node:zlib';
import { Router, type NextFunction, type Request, type Response } from 'express';
import type { z } from 'zod';
import { roleAtLeast, type Role } from '../../shared/constants/roles';
import type { User } from '../../shared/schemas/auth';
import { Forbidden, Unauthenticated, ValidationFailed } from './errors';
import type { AuthedRequest } from './types';
import { zodFieldErrors } from './zod-errors';

/**
 * Every API route is declared through `secureRouter`, whose methods demand an access rule. The rule's
 * middleware is always the first handler of the route and is tagged, so a test can walk the mounted
 * app and prove that no route exists without one (deny by default).
 *
 *   'public'  — anyone, signed in or not (sign-in, password reset, health)
 *   a Role    — a signed-in, enabled user of at least that role (ROLES order)
 */
export type AccessRule = 'public' | Role;

export const ACCESS_TAG = Symbol.for('lumenbook.access');

type Schemas = { body?: z.ZodType; query?: z.ZodType; params?: z.ZodType };
type Parsed<S extends Schemas, K extends keyof Schemas> = S[K] extends z.ZodType ? z.output<S[K]> : undefined;

export interface RouteContext<S extends Schemas, U> {
  body: Parsed<S, 'body'>;
  query: Parsed<S, 'query'>;
  params: Parsed<S, 'params'>;
  user: U;
  req: AuthedRequest;
  res: Response;
}

type UserFor<R extends AccessRule> = R extends 'public' ? User | null : User;

export interface RouteOptions<R extends AccessRule, S extends Schemas> {
  access: R;
  schemas?: S;
  /** HTTP status for a successful answer (default 200). */
  status?: number;
}

/**
 * An answer already serialised (a remembered list page or Bench): sent as it is, so a page read many times
 * between two writes is stringified once rather than on every request.
 */
export class JsonText {
  /**
   * The JSON as UTF-8, which is what is sent. Kept as bytes, not as the string: a single character beyond
   * Latin-1 (a minus sign, a µ) makes V8 hold the whole string at two bytes a character, and a remembered
   * Compare overview at 100k coupons is ~6 MB of JSON (bench/server-memory.ts).
   */
  readonly bytes: Buffer;
  private zipped: Buffer | undefined;
  private tag: string | undefined;
  constructor(text: string) {
    this.bytes = Buffer.from(text, 'utf8');
  }
  /** Its gzip (level 1, as the API's compression), made once: a remembered answer is sent many times. */
  get gzipped(): Buffer {
    return (this.zipped ??= zlib.gzipSync(this.bytes, { level: 1 }));
  }
  /** A weak ETag of the text, made once (Express would hash the body on every send). */
  get etag(): string {
    return (this.tag ??= `W/"${crypto.createHash('sha1').update(this.bytes).digest('base64url')}"`);
  }
}

/** Sends a JsonText, gzipped from its own copy when the client takes gzip and it is worth it (over 1 kB, as `compression`). */
function sendJsonText(req: Request, res: Response, status: number, body: JsonText): void {
  res.status(status).type('json');
  res.setHeader('ETag', body.etag);
  res.vary('Accept-Encoding');
  if (body.bytes.length >= 1024 && req.acceptsEncodings('gzip') === 'gzip') {
    // compression() leaves an answer that already names its encoding alone.
    res.setHeader('Content-Encoding', 'gzip');
    res.send(body.gzipped);
  } else res.send(body.bytes);
}

/** A handler returns the JSON body (or a JsonText), or undefined after answering through `res` itself. */
type Handler<R extends AccessRule, S extends Schemas> = (ctx: RouteContext<S, UserFor<R>>) => unknown;

export interface DeclaredRoute {
  method: string;
  path: string;
  access: AccessRule;
}

export function accessMiddleware(rule: AccessRule) {
  const mw = (req: AuthedRequest, _res: Response, next: NextFunction) => {
    if (rule === 'public') return next();
    if (!req.user) return next(new Unauthenticated());
    if (!roleAtLeast(req.user.role, rule)) return next(new Forbidden(`This needs the ${rule} role or higher`));
    next();
  };
  Object.defineProperty(mw, ACCESS_TAG, { value: rule });
  return mw;
}

function parsePart(schema: z.ZodType | undefined, value: unknown, part: string): unknown {
  if (!schema) return undefined;
  const result = schema.safeParse(value ?? {});
  if (!result.success) {
    throw new ValidationFailed(`Invalid ${part}: ${result.error.issues[0]?.message ?? 'check the fields'}`, zodFieldErrors(result.error));
  }
  return result.data;
}

export function secureRouter() {
  const router = Router();
  const declared: DeclaredRoute[] = [];

  function add(method: 'get' | 'post' | 'patch' | 'put' | 'delete') {
    return <R extends AccessRule, S extends Schemas = Record<never, never>>(path: string, options: RouteOptions<R, S>, handler: Handler<R, S>) => {
      declared.push({ method: method.toUpperCase(), path, access: options.access });
      const run = async (req: Request, res: Response) => {
        const areq = req as AuthedRequest;
        const s = options.schemas ?? ({} as S);
        const ctx = {
          body: parsePart(s.body, req.body, 'body'),
          query: parsePart(s.query, req.query, 'query'),
          params: parsePart(s.params, req.params, 'path'),
          user: areq.user ?? null,
          req: areq,
          res,
        } as RouteContext<S, UserFor<R>>;
        const result = await handler(ctx);
        if (res.headersSent) return;
        if (result === undefined) res.status(options.status ?? 204).end();
        else if (result instanceof JsonText) sendJsonText(req, res, options.status ?? 200, result);
        else res.status(options.status ?? 200).json(result);
      };
      router[method](path, accessMiddleware(options.access), run);
    };
  }

  return {
    router,
    declared,
    get: add('get'),
    post: add('post'),
    patch: add('patch'),
    put: add('put'),
    delete: add('delete'),
  };
}
export type SecureRouter = ReturnType<typeof secureRouter>;
