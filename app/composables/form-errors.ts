/**
 * Field errors from the same zod schema the server uses, and from a server's
 * `validation_failed` answer, as a map from field path to messages for Vuetify fields.
 */
import type { z } from 'zod';
import { ApiError } from './http';

export type FieldErrors = Record<string, string[]>;

export function errorsFromZod(error: z.ZodError): FieldErrors {
  const out: FieldErrors = {};
  for (const issue of error.issues) {
    const key = issue.path.join('.') || '_';
    (out[key] ??= []).push(issue.message);
  }
  return out;
}

/** Field errors from an API validation error, or null when the error is something else. */
export function errorsFromApi(error: unknown): FieldErrors | null {
  if (!(error instanceof ApiError) || (error.code !== 'validation_failed' && error.code !== 'conflict')) return null;
  const issues = (error.details as { issues?: { path: string; message: string }[] } | undefined)?.issues;
  if (!issues?.length) return null;
  const out: FieldErrors = {};
  for (const issue of issues) (out[issue.path || '_'] ??= []).push(issue.message);
  return out;
}
