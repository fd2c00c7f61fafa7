import { z } from 'zod';

/**
 * The one error vocabulary of the product. The server answers every failure with
 * `{ "error": { "code", "message", "details"? } }` and one of these codes; the client
 * switches on the code, never on the message.
 */
export const errorCodes = {
  bad_request: 400,
  malformed_json: 400,
  validation_failed: 400,
  /** A pasted GNU size report that cannot be read (the message says where). */
  size_report_invalid: 400,
  unauthenticated: 401,
  forbidden: 403,
  csrf_failed: 403,
  suspended: 403,
  not_found: 404,
  conflict: 409,
  edit_conflict: 409,
  /** A project already has a pin map for that part on that board revision. */
  pin_map_exists: 409,
  gone: 410,
  precondition_required: 428,
  payload_too_large: 413,
  unsupported_media_type: 415,
  rate_limited: 429,
  internal: 500,
  service_unavailable: 503,
} as const;

export type ErrorCode = keyof typeof errorCodes;

export const errorCodeSchema = z.enum(Object.keys(errorCodes) as [ErrorCode, ...ErrorCode[]]);

export const errorBodySchema = z.object({
  error: z.object({
    code: errorCodeSchema,
    message: z.string(),
    details: z.unknown().optional(),
  }),
});

export type ErrorBody = z.infer<typeof errorBodySchema>;

/** A field-level problem, as carried in `details.issues` of a `validation_failed` error. */
export interface FieldIssue {
  path: string;
  message: string;
}

export function isErrorBody(value: unknown): value is ErrorBody {
  return errorBodySchema.safeParse(value).success;
}
