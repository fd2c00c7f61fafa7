/**
 * Rendered Markdown, cached in the process by a key that changes with the content (e.g.
 * document id + revision), so reading a project page does not re-render unchanged text.
 * Bounded: the oldest entries go first. A miss only costs a render.
 *
 * Uploaded photos change what the HTML says without the text changing (variants become ready,
 * alt text is added), so the key also carries a digest of the images the text points at.
 */
import { createHash } from 'node:crypto';
import { renderMarkdown, type MarkdownImage, type RenderedMarkdown } from './render';

const LIMIT = 2_000;
const cache = new Map<string, { source: string; rendered: RenderedMarkdown }>();

const UPLOAD_IDS = /\/api\/uploads\/(\d{1,9})\//g;

/** Digest of the map entries this text can use ('' when it names no upload). */
export function imagesDigest(markdown: string, images: ReadonlyMap<string, MarkdownImage> | undefined): string {
  if (!images) return '';
  const ids = [...new Set(Array.from(markdown.matchAll(UPLOAD_IDS), (m) => m[1]!))].sort();
  if (!ids.length) return '';
  const hash = createHash('sha256');
  for (const id of ids) hash.update(`${id}=${JSON.stringify(images.get(id) ?? null)};`);
  return hash.digest('base64url').slice(0, 16);
}

export function renderCached(
  key: string,
  markdown: string,
  idPrefix: string,
  images?: ReadonlyMap<string, MarkdownImage>,
): RenderedMarkdown {
  const digest = imagesDigest(markdown, images);
  const fullKey = `${key}${images ? `#i${digest}` : ''}`;
  const hit = cache.get(fullKey);
  // The source is compared too: a key reused for other text must not serve stale HTML.
  if (hit && hit.source === markdown) {
    cache.delete(fullKey);
    cache.set(fullKey, hit);
    return hit.rendered;
  }
  const rendered = renderMarkdown(markdown, { idPrefix, ...(images ? { images } : {}) });
  cache.set(fullKey, { source: markdown, rendered });
  if (cache.size > LIMIT) cache.delete(cache.keys().next().value as string);
  return rendered;
}
