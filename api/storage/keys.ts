/**
 * Storage keys are derived from content, never from anything a client sent: the original of an
 * upload lives at `originals/<sha256 of the stored bytes>`, its variants under
 * `variants/<that sha256>/<name>.<ext>`. Identical files are therefore stored once, and a key can
 * be recomputed from the database row alone.
 */
const SHA256 = /^[0-9a-f]{64}$/;
const VARIANT_FILE = /^[a-z]+\.[a-z0-9]+$/;

export const ORIGINALS = 'originals/';
export const VARIANTS = 'variants/';

export function originalKey(sha256: string): string {
  if (!SHA256.test(sha256)) throw new TypeError(`not a sha256 digest: ${JSON.stringify(sha256)}`);
  return `${ORIGINALS}${sha256}`;
}

export function variantKey(sha256: string, file: string): string {
  if (!SHA256.test(sha256)) throw new TypeError(`not a sha256 digest: ${JSON.stringify(sha256)}`);
  if (!VARIANT_FILE.test(file)) throw new TypeError(`not a variant file name: ${JSON.stringify(file)}`);
  return `${VARIANTS}${sha256}/${file}`;
}

export const variantPrefix = (sha256: string) => `${VARIANTS}${sha256}/`;

/** The digest a key belongs to (originals and variants alike), or null for a key we never write. */
export function digestOfKey(key: string): string | null {
  const match = /^(?:originals\/([0-9a-f]{64})|variants\/([0-9a-f]{64})\/[a-z]+\.[a-z0-9]+)$/.exec(key);
  return match ? (match[1] ?? match[2]!) : null;
}

/** Keys are made above; anything else reaching an adapter is a programming error. */
export function assertSafeKey(key: string): void {
  if (!/^[a-z]+(?:\/[A-Za-z0-9][A-Za-z0-9._-]*)+$/.test(key) || key.split('/').some((part) => part === '..')) {
    throw new TypeError(`unsafe storage key: ${JSON.stringify(key)}`);
  }
}
