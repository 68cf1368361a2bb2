import type { z } from 'zod';
import { CSRF_HEADER, CSRF_VALUE, type ErrorCode } from '../../shared/constants/errors';
import { errorEnvelopeSchema } from '../../shared/schemas/common';

/** A non-2xx answer from the API, typed from the server's error envelope. */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: ErrorCode,
    message: string,
    readonly fieldErrors: Record<string, string[]> = {},
    readonly requestId?: string,
  ) {
    super(message);
    this.name = 'ApiError';
  }
}

type Listener = (error: ApiError) => void;
const globalListeners = new Set<Listener>();
/** Only 401 and 5xx act globally (back to sign-in, or a banner); everything else stays with its form. */
export function onGlobalApiError(listener: Listener): () => void {
  globalListeners.add(listener);
  return () => globalListeners.delete(listener);
}

async function request<T>(method: string, path: string, schema: z.ZodType<T> | null, body?: unknown): Promise<T> {
  const headers: Record<string, string> = { Accept: 'application/json' };
  let payload: BodyInit | undefined;
  if (body instanceof FormData) payload = body;
  else if (body !== undefined) {
    headers['Content-Type'] = 'application/json';
    payload = JSON.stringify(body);
  }
  if (method !== 'GET') headers[CSRF_HEADER] = CSRF_VALUE;

  let res: Response;
  try {
    res = await fetch(`/api${path}`, { method, headers, body: payload, credentials: 'same-origin' });
  } catch {
    throw new ApiError(0, 'internal', 'The server cannot be reached; check the connection and try again');
  }
  const text = await res.text();
  const json: unknown = text ? safeJson(text) : undefined;
  if (!res.ok) {
    const env = errorEnvelopeSchema.safeParse(json);
    const err = env.success
      ? new ApiError(res.status, env.data.error.code, env.data.error.message, env.data.error.fieldErrors, env.data.error.requestId)
      : new ApiError(res.status, res.status >= 500 ? 'internal' : 'validation_failed', `The server answered ${res.status}`);
    if (res.status === 401 || res.status >= 500) for (const l of globalListeners) l(err);
    throw err;
  }
  if (!schema) return undefined as T;
  const parsed = schema.safeParse(json);
  if (!parsed.success) throw new ApiError(res.status, 'internal', 'The server sent an answer this page does not understand');
  return parsed.data;
}

function safeJson(text: string): unknown {
  try {
    return JSON.parse(text);
  } catch {
    return undefined;
  }
}

export const api = {
  get: <T>(path: string, schema: z.ZodType<T>) => request('GET', path, schema),
  post: <T>(path: string, body: unknown, schema: z.ZodType<T> | null) => request('POST', path, schema, body),
  patch: <T>(path: string, body: unknown, schema: z.ZodType<T> | null) => request('PATCH', path, schema, body),
  delete: <T>(path: string, body: unknown, schema: z.ZodType<T> | null) => request('DELETE', path, schema, body),
};

/** `{a: 1, b: undefined}` → `?a=1` */
export function queryString(params: Record<string, string | number | boolean | undefined | null>): string {
  const q = new URLSearchParams();
  for (const [k, v] of Object.entries(params)) if (v !== undefined && v !== null && v !== '') q.set(k, String(v));
  const s = q.toString();
  return s ? `?${s}` : '';
}
