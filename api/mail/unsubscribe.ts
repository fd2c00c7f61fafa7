/**
 * Signed unsubscribe links. A token names one member and one kind of notification (or the
 * daily digest as a whole) and is signed with HMAC-SHA256 under a key derived from the
 * session secret for this purpose only, so a token cannot be forged or moved to another
 * member or kind. Tokens do not expire (an old e-mail's link keeps working); the leading
 * version byte lets a later format or key coexist with this one.
 *
 * Layout before base64url: version (1 byte) | user id (uint32, big-endian) | kind length
 * (1 byte) | kind (ASCII) | HMAC of everything before it (32 bytes).
 */
import { createHmac, hkdfSync, timingSafeEqual } from 'node:crypto';
import { notificationKinds, type NotificationKind } from '../../shared/contracts/errata';
import type { Config } from '../config';

/** What one link turns off: one kind, or every kind the member gets in the daily digest. */
export type UnsubscribeScope = NotificationKind | 'daily_digest';
export const unsubscribeScopes: readonly UnsubscribeScope[] = [...notificationKinds, 'daily_digest'];

const VERSION = 1;
const MAC_BYTES = 32;
const HEADER_BYTES = 6;
const TOKEN_RE = /^[A-Za-z0-9_-]{40,200}$/;

function signingKey(secret: string): Buffer {
  return Buffer.from(hkdfSync('sha256', secret, 'reworkbook', 'unsubscribe links, version 1', 32));
}

const mac = (secret: string, body: Buffer) => createHmac('sha256', signingKey(secret)).update(body).digest();

export function createUnsubscribeToken(secret: string, userId: number, kind: UnsubscribeScope): string {
  if (!Number.isInteger(userId) || userId < 1 || userId > 0xffffffff) throw new RangeError(`bad user id ${userId}`);
  const kindBytes = Buffer.from(kind, 'ascii');
  const body = Buffer.alloc(HEADER_BYTES + kindBytes.length);
  body.writeUInt8(VERSION, 0);
  body.writeUInt32BE(userId, 1);
  body.writeUInt8(kindBytes.length, 5);
  kindBytes.copy(body, HEADER_BYTES);
  return Buffer.concat([body, mac(secret, body)]).toString('base64url');
}

/** The member and kind a token names, or null for anything not signed by us in this format. */
export function verifyUnsubscribeToken(
  secret: string,
  token: string,
): { userId: number; kind: UnsubscribeScope } | null {
  if (!TOKEN_RE.test(token)) return null;
  const bytes = Buffer.from(token, 'base64url');
  // Node's decoder ignores stray trailing characters: accept only the one canonical spelling.
  if (bytes.toString('base64url') !== token) return null;
  if (bytes.length < HEADER_BYTES + MAC_BYTES || bytes.readUInt8(0) !== VERSION) return null;
  const kindLength = bytes.readUInt8(5);
  if (bytes.length !== HEADER_BYTES + kindLength + MAC_BYTES) return null;
  const body = bytes.subarray(0, HEADER_BYTES + kindLength);
  if (!timingSafeEqual(bytes.subarray(body.length), mac(secret, body))) return null;
  const kind = body.subarray(HEADER_BYTES).toString('ascii');
  const userId = bytes.readUInt32BE(1);
  if (userId < 1 || !(unsubscribeScopes as readonly string[]).includes(kind)) return null;
  return { userId, kind: kind as UnsubscribeScope };
}

export interface UnsubscribeLinks {
  /** The page a person opens from the mail body: it explains, then asks for a click. */
  page: string;
  /** The RFC 8058 one-click endpoint: POST unsubscribes, GET only describes. */
  oneClick: string;
}

export function unsubscribeLinks(
  config: Pick<Config, 'appOrigin' | 'sessionSecret'>,
  userId: number,
  kind: UnsubscribeScope,
): UnsubscribeLinks {
  const token = encodeURIComponent(createUnsubscribeToken(config.sessionSecret, userId, kind));
  return {
    page: `${config.appOrigin}/unsubscribe?token=${token}`,
    oneClick: `${config.appOrigin}/api/unsubscribe?token=${token}`,
  };
}

/**
 * The header fields of RFC 2369 (List-Unsubscribe, a URI in angle brackets) and RFC 8058
 * §3.1 (List-Unsubscribe-Post with exactly "List-Unsubscribe=One-Click"), which let a mail
 * client unsubscribe with one POST and no page visit.
 */
export function listUnsubscribeHeaders(oneClick: string): Record<string, string> {
  return { 'List-Unsubscribe': `<${oneClick}>`, 'List-Unsubscribe-Post': 'List-Unsubscribe=One-Click' };
}
