import type { ErrorCode } from '../../shared/constants/errors';

/**
 * The small family of errors services throw. The error middleware turns each into the API's
 * error envelope; anything else becomes a 500 whose details stay in the log.
 */
export class AppError extends Error {
  constructor(
    readonly code: ErrorCode,
    message: string,
    readonly fieldErrors?: Record<string, string[]>,
  ) {
    super(message);
    this.name = new.target.name;
  }
}

export class ValidationFailed extends AppError {
  constructor(message: string, fieldErrors?: Record<string, string[]>) {
    super('validation_failed', message, fieldErrors);
  }
}
export class Unauthenticated extends AppError {
  constructor(message = 'Sign in to continue') {
    super('unauthenticated', message);
  }
}
export class Forbidden extends AppError {
  constructor(message = 'Your role does not allow this') {
    super('forbidden', message);
  }
}
export class NotFound extends AppError {
  constructor(what = 'Resource') {
    super('not_found', `${what} not found`);
  }
}
export class Conflict extends AppError {
  constructor(message: string, fieldErrors?: Record<string, string[]>) {
    super('conflict', message, fieldErrors);
  }
}
/** Well-formed but impossible, e.g. a cured mass below the dry mass. */
export class Unprocessable extends AppError {
  constructor(message: string, fieldErrors?: Record<string, string[]>) {
    super('unprocessable', message, fieldErrors);
  }
}
export class PayloadTooLarge extends AppError {
  constructor(message: string, fieldErrors?: Record<string, string[]>) {
    super('payload_too_large', message, fieldErrors);
  }
}
