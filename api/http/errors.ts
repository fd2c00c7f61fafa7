/**
 * The one error factory. Services throw `AppError`s with a code from shared/errors.ts; the
 * error middleware turns them into the wire shape. Anything else is a bug: logged in full,
 * answered with a generic 500.
 */
import { errorCodes, type ErrorCode } from '../../shared/errors';

export class AppError extends Error {
  override name = 'AppError';
  readonly status: number;

  constructor(
    readonly code: ErrorCode,
    message: string,
    readonly details?: unknown,
    options?: { cause?: unknown; status?: number },
  ) {
    super(message, options?.cause === undefined ? undefined : { cause: options.cause });
    this.status = options?.status ?? errorCodes[code];
  }
}

export const fail = {
  badRequest: (message: string, details?: unknown) => new AppError('bad_request', message, details),
  validation: (message: string, details?: unknown) => new AppError('validation_failed', message, details),
  unauthenticated: (message = 'Sign in to do this.') => new AppError('unauthenticated', message),
  forbidden: (message = 'You do not have permission to do this.') => new AppError('forbidden', message),
  notFound: (what = 'The item') => new AppError('not_found', `${what} was not found.`),
  conflict: (message: string, details?: unknown) => new AppError('conflict', message, details),
  gone: (message: string) => new AppError('gone', message),
  preconditionRequired: (message: string) => new AppError('precondition_required', message),
  rateLimited: (retryAfterSeconds: number) =>
    new AppError('rate_limited', `Too many requests. Try again in ${retryAfterSeconds} s.`, { retryAfterSeconds }),
  unavailable: (message: string) => new AppError('service_unavailable', message),
};

/** PostgreSQL error codes worth translating into product errors instead of a 500. */
export function isUniqueViolation(error: unknown, constraint?: string): boolean {
  const e = findPgError(error);
  return e?.code === '23505' && (constraint === undefined || e.constraint === constraint);
}

export function findPgError(error: unknown): { code?: string; constraint?: string; message: string } | undefined {
  let current: unknown = error;
  for (let depth = 0; depth < 5 && current; depth++) {
    if (typeof current === 'object' && current !== null && 'code' in current && 'severity' in current) {
      return current as unknown as { code?: string; constraint?: string; message: string };
    }
    current = (current as { cause?: unknown }).cause;
  }
  return undefined;
}
