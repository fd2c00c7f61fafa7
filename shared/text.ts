/**
 * String contracts shared by forms and the server. PostgreSQL refuses NUL in text and a lone
 * UTF-16 surrogate cannot be stored faithfully, so both are refused here with a clear message
 * rather than failing (or silently changing) at the database.
 */
import { z } from 'zod';

// Control characters other than tab, line feed and carriage return.
const FORBIDDEN_CONTROL = /[\u0000-\u0008\u000B\u000C\u000E-\u001F\u007F]/;

function storable(value: string): boolean {
  return value.isWellFormed() && !FORBIDDEN_CONTROL.test(value);
}

const storableMessage = 'contains a character that cannot be stored (NUL, a control character or a broken surrogate pair)';

/** Single-line text: trimmed, no line breaks. */
export function line(options: { min?: number; max: number; label?: string }) {
  const label = options.label ?? 'This field';
  return z
    .string()
    .trim()
    .min(options.min ?? 1, options.min === 0 ? undefined : `${label} is required`)
    .max(options.max, `${label} is at most ${options.max} characters`)
    .refine(storable, `${label} ${storableMessage}`)
    .refine((v) => !/[\r\n]/.test(v), `${label} must be a single line`);
}

/** Multi-line text or Markdown: kept as written (no trim), line breaks allowed. */
export function prose(options: { min?: number; max: number; label?: string }) {
  const label = options.label ?? 'This field';
  return z
    .string()
    .min(options.min ?? 0, `${label} is required`)
    .max(options.max, `${label} is at most ${options.max.toLocaleString('en')} characters`)
    .refine(storable, `${label} ${storableMessage}`);
}

/** A member handle: what the provider allows for logins (letters, digits, single hyphens). */
export const handleSchema = z
  .string()
  .trim()
  .min(1)
  .max(39)
  .regex(/^[A-Za-z0-9](?:[A-Za-z0-9]|-(?=[A-Za-z0-9]))*$/, 'letters, digits and single hyphens, not at either end');

/** A URL slug: lowercase words joined by hyphens. */
export const slugSchema = z
  .string()
  .trim()
  .min(2, 'at least 2 characters')
  .max(80, 'at most 80 characters')
  .regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, 'lowercase letters and digits joined by single hyphens');

export function slugify(text: string): string {
  return text
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 80)
    .replace(/-+$/g, '');
}

/** An app-relative path safe to redirect to after sign-in: one leading slash, no scheme or host. */
export function isAppRelativePath(value: unknown): value is string {
  if (typeof value !== 'string' || value.length === 0 || value.length > 2000) return false;
  if (!value.startsWith('/') || value.startsWith('//') || value.startsWith('/\\')) return false;
  if (/[\u0000-\u001F\u007F\\]/.test(value)) return false;
  try {
    const parsed = new URL(value, 'http://app.invalid');
    return parsed.origin === 'http://app.invalid';
  } catch {
    return false;
  }
}
