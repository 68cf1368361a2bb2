/** Machine codes of the API error envelope, one per HTTP status the API answers with. */
export const ERROR_CODES = [
  'validation_failed', // 400
  'unauthenticated', // 401
  'forbidden', // 403
  'not_found', // 404
  'conflict', // 409
  'payload_too_large', // 413
  'unprocessable', // 422
  'rate_limited', // 429
  'internal', // 500
  'storage_unavailable', // 503: the data folder or database cannot be written
  'storage_full', // 507: the disk holding the data is full
] as const;
export type ErrorCode = (typeof ERROR_CODES)[number];

export const STATUS_OF: Record<ErrorCode, number> = {
  validation_failed: 400,
  unauthenticated: 401,
  forbidden: 403,
  not_found: 404,
  conflict: 409,
  payload_too_large: 413,
  unprocessable: 422,
  rate_limited: 429,
  internal: 500,
  storage_unavailable: 503,
  storage_full: 507,
};

/** The header every cookie-authenticated write must carry (CSRF defence together with SameSite cookies). */
export const CSRF_HEADER = 'x-lumenbook-csrf';
export const CSRF_VALUE = '1';
