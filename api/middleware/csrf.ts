/**
 * CSRF protection for unsafe methods: an exact-match Origin check plus a synchronizer token
 * kept in the session and sent back in the X-CSRF-Token header. SameSite=Lax cookies already
 * stop most cross-site posts; these two checks close what is left (same-site subdomains,
 * old browsers, form posts from our own origin's injected markup).
 */
import { randomBytes, timingSafeEqual } from 'node:crypto';
import type { Request } from 'express';
import type { Config } from '../config';
import { AppError } from '../http/errors';

export const CSRF_HEADER = 'x-csrf-token';

export function newCsrfToken(): string {
  return randomBytes(32).toString('base64url');
}

function sameToken(a: string, b: string): boolean {
  const x = Buffer.from(a);
  const y = Buffer.from(b);
  return x.length === y.length && timingSafeEqual(x, y);
}

export function checkCsrf(req: Request, config: Pick<Config, 'appOrigin'>): void {
  const origin = req.get('origin');
  if (origin !== config.appOrigin) {
    throw new AppError('csrf_failed', 'This request did not come from a Reworkbook page (Origin header missing or foreign).');
  }
  const expected = req.session?.csrfToken;
  const given = req.get(CSRF_HEADER);
  if (!expected || !given || !sameToken(expected, given)) {
    throw new AppError('csrf_failed', 'The security token is missing or out of date. Reload the page and try again.');
  }
}
