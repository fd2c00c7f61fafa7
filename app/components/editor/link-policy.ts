/**
 * Which addresses the editor lets a writer put into a link or an image. The server's renderer
 * has the final word (api/markdown/render.ts drops anything it does not allow); this is the
 * friendlier check in the dialogs, which says what is wrong instead of dropping it later.
 */

const SCHEME = /^([A-Za-z][A-Za-z0-9+.-]*):/;
// Controls, spaces and invisible characters a browser would skip while reading a scheme.
const IGNORABLE = /[\u0000-\u0020\u007F-\u00A0\u00AD\u200B-\u200F\u2028-\u202F\u2060-\u2064\uFEFF]/g;

function schemeOf(url: string): string | null {
  const match = SCHEME.exec(url.replace(IGNORABLE, ''));
  return match ? match[1]!.toLowerCase() : null;
}

/** `/projects/x` is a path in this app; `//host/x` (or `/\host`) is another site in disguise. */
function isAppPath(url: string): boolean {
  return url.startsWith('/') && !/^[/\\]{2}/.test(url.replace(IGNORABLE, ''));
}

/**
 * Why a link address is refused, or null when it is fine: http, https and mailto addresses and
 * paths inside Reworkbook (`/projects/…`).
 */
export function linkProblem(raw: string): string | null {
  const url = raw.trim();
  if (url === '') return 'Enter an address.';
  if (/\s/.test(url)) return 'An address cannot contain spaces.';
  const scheme = schemeOf(url);
  if (scheme === null) {
    if (isAppPath(url)) return null;
    return 'Use an address starting with https://, http:// or mailto:, or a path in Reworkbook starting with /.';
  }
  if (scheme === 'http' || scheme === 'https') {
    try {
      const parsed = new URL(url);
      return parsed.hostname ? null : 'This address has no host name.';
    } catch {
      return 'This is not a complete web address.';
    }
  }
  if (scheme === 'mailto') return url.length > 'mailto:'.length ? null : 'Add the e-mail address after mailto:.';
  return `Links to "${scheme}:" addresses are not allowed. Use https://, http://, mailto: or a path starting with /.`;
}

/** Why an image address is refused, or null: only http and https images are embedded. */
export function imageProblem(raw: string): string | null {
  const url = raw.trim();
  if (url === '') return 'Enter the address of the image.';
  if (/\s/.test(url)) return 'An address cannot contain spaces.';
  const scheme = schemeOf(url);
  if (scheme !== 'http' && scheme !== 'https') return 'Use an image address starting with https:// or http://.';
  try {
    return new URL(url).hostname ? null : 'This address has no host name.';
  } catch {
    return 'This is not a complete web address.';
  }
}

/**
 * What the editing surface itself treats as a live link (pasted HTML, autolinks, the DOM it
 * draws). Wider than the dialog: links already stored with a fragment (`#h-wiring`) or a
 * relative path keep working, because dropping them would change the writer's text. Scripts and
 * data URLs never are links here.
 */
export function isSafeLinkHref(raw: string): boolean {
  const url = raw.trim();
  const scheme = schemeOf(url);
  if (scheme === null) return !/^[/\\]{2}/.test(url.replace(IGNORABLE, ''));
  return scheme === 'http' || scheme === 'https' || scheme === 'mailto';
}
