/**
 * The one error middleware: every failure leaves as `{ "error": { code, message, details? } }`.
 * Known failures (AppError, body-parser's errors, a database that is down) keep their status;
 * anything else is logged in full and answered with a generic 500, never a stack trace.
 */
import type { ErrorRequestHandler, RequestHandler } from 'express';
import { errorCodes, type ErrorBody, type ErrorCode } from '../../shared/errors';
import type { Logger } from '../log';
import { AppError, findPgError } from '../http/errors';

const BODY_PARSER_ERRORS: Record<string, { code: ErrorCode; message: string }> = {
  'entity.parse.failed': { code: 'malformed_json', message: 'The request body is not valid JSON.' },
  'entity.too.large': { code: 'payload_too_large', message: 'The request body is too large.' },
  'entity.verify.failed': { code: 'bad_request', message: 'The request body was refused.' },
  'request.aborted': { code: 'bad_request', message: 'The request was aborted.' },
  'request.size.invalid': { code: 'bad_request', message: 'The request size does not match its Content-Length.' },
  'stream.encoding.set': { code: 'internal', message: 'Internal error.' },
  'charset.unsupported': { code: 'unsupported_media_type', message: 'Send the request body as UTF-8.' },
  'encoding.unsupported': { code: 'unsupported_media_type', message: 'That content encoding is not supported.' },
};

/** Connection-level failures mean the database is unreachable: a 503, not a bug. */
function isDatabaseDown(error: unknown): boolean {
  const pgError = findPgError(error);
  if (pgError?.code && /^(08|57P0[1-3]|53300)/.test(pgError.code)) return true;
  let current: unknown = error;
  for (let depth = 0; depth < 5 && current; depth++) {
    const e = current as { code?: string; message?: string; cause?: unknown };
    if (e.code && ['ECONNREFUSED', 'ECONNRESET', 'ETIMEDOUT', 'EPIPE', 'ENOTFOUND'].includes(e.code)) return true;
    if (e.message && /Connection terminated|timeout exceeded when trying to connect|Client has encountered a connection error/i.test(e.message)) {
      return true;
    }
    current = e.cause;
  }
  return false;
}

export function toErrorBody(error: unknown, log: Logger): { status: number; body: ErrorBody } {
  if (error instanceof AppError) {
    const body: ErrorBody = { error: { code: error.code, message: error.message } };
    if (error.details !== undefined) body.error.details = error.details;
    return { status: error.status, body };
  }
  const type = (error as { type?: string })?.type;
  if (type && BODY_PARSER_ERRORS[type]) {
    const known = BODY_PARSER_ERRORS[type];
    return { status: errorCodes[known.code], body: { error: { code: known.code, message: known.message } } };
  }
  // http-errors raised by Express itself (e.g. express.static's 404): keep the status.
  const status = (error as { status?: number; expose?: boolean })?.status;
  if (typeof status === 'number' && status >= 400 && status < 500 && (error as { expose?: boolean }).expose) {
    const code: ErrorCode = status === 404 ? 'not_found' : status === 413 ? 'payload_too_large' : status === 415 ? 'unsupported_media_type' : 'bad_request';
    return { status, body: { error: { code, message: code === 'not_found' ? 'Not found.' : (error as Error).message } } };
  }
  if (isDatabaseDown(error)) {
    log.warn(`database unavailable: ${(error as Error).message}`);
    return {
      status: 503,
      body: { error: { code: 'service_unavailable', message: 'The database is not reachable right now. Try again shortly.' } },
    };
  }
  log.error('unexpected error', error);
  return { status: 500, body: { error: { code: 'internal', message: 'Something went wrong on our side.' } } };
}

export function errorHandler(log: Logger): ErrorRequestHandler {
  return (error, _req, res, _next) => {
    const { status, body } = toErrorBody(error, log);
    if (res.headersSent) {
      res.end();
      return;
    }
    res.status(status).json(body);
  };
}

export const apiNotFound: RequestHandler = (req) => {
  throw new AppError('not_found', `No API route for ${req.method} ${req.originalUrl.split('?')[0]}.`);
};
