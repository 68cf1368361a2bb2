import type { ErrorRequestHandler, RequestHandler } from 'express';
import { STATUS_OF, type ErrorCode } from '../../shared/constants/errors';
import type { ErrorEnvelope } from '../../shared/schemas/common';
import { DomainError } from '../../shared/domain/errors';
import { databaseBusy, storageProblem } from '../db/storage-errors';
import { AppError } from './errors';
import type { AuthedRequest } from './types';

function envelope(code: ErrorCode, message: string, requestId: unknown, fieldErrors?: Record<string, string[]>): ErrorEnvelope {
  return { error: { code, message, ...(fieldErrors ? { fieldErrors } : {}), requestId: requestId ? String(requestId) : undefined } };
}

/** Unknown /api paths answer the envelope, never the SPA's HTML. */
export const apiNotFound: RequestHandler = (req, res) => {
  res.status(404).json(envelope('not_found', `No API route ${req.method} ${req.path}`, (req as AuthedRequest).id));
};

/**
 * The one error middleware. Known errors keep their message; a DomainError is a 422 naming its field;
 * body-parser's errors get plain words;
 * everything else is a 500 whose stack goes to the log only.
 */
export const errorHandler: ErrorRequestHandler = (err, req, res, _next) => {
  const requestId = (req as AuthedRequest).id;
  if (res.headersSent) return;
  if (err instanceof AppError) {
    res.status(STATUS_OF[err.code]).json(envelope(err.code, err.message, requestId, err.fieldErrors));
    return;
  }
  // The domain refuses physically impossible input with the argument it came from; a service that did not
  // word it for its own form still answers 422 naming that field, never a 500.
  if (err instanceof DomainError) {
    res.status(STATUS_OF.unprocessable).json(envelope('unprocessable', err.message, requestId, { [err.field]: [err.message] }));
    return;
  }
  const type = (err as { type?: string }).type;
  if (type === 'entity.too.large') {
    res.status(413).json(envelope('payload_too_large', 'The request body is too large', requestId));
    return;
  }
  if (type === 'entity.parse.failed') {
    res.status(400).json(envelope('validation_failed', 'The request body is not valid JSON', requestId, { _: ['Malformed JSON'] }));
    return;
  }
  if (type === 'encoding.unsupported' || type === 'charset.unsupported') {
    res.status(400).json(envelope('validation_failed', 'Unsupported body encoding', requestId));
    return;
  }
  const code = (err as { code?: string }).code;
  if (code === 'LIMIT_FILE_SIZE') {
    res.status(413).json(envelope('payload_too_large', 'The uploaded file is too large', requestId, { file: ['File too large'] }));
    return;
  }
  if (databaseBusy(err)) {
    req.log?.warn({ err }, 'database busy');
    res
      .status(STATUS_OF.storage_unavailable)
      .set('Retry-After', '3')
      .json(envelope('storage_unavailable', 'A large import is being written to the database, so nothing was saved. Try again in a moment.', requestId));
    return;
  }
  // A full or read-only disk is not a bug: say so plainly, with the status that names it (507, 503).
  const storage = storageProblem(err);
  if (storage) {
    req.log?.error({ err }, `storage ${storage}`);
    const message =
      storage === 'full'
        ? "The disk holding the shop's data is full, so nothing was saved. Free some space (or ask whoever runs the server) and try again."
        : "The shop's data folder cannot be written (read-only disk or permissions), so nothing was saved. Ask whoever runs the server.";
    res
      .status(STATUS_OF[storage === 'full' ? 'storage_full' : 'storage_unavailable'])
      .json(envelope(storage === 'full' ? 'storage_full' : 'storage_unavailable', message, requestId));
    return;
  }
  req.log?.error({ err }, 'unhandled error');
  res.status(500).json(envelope('internal', 'Something went wrong on the server; the request id identifies it in the log', requestId));
};
