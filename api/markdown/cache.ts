/**
 * Rendered Markdown, cached in the process by a key that changes with the content (e.g.
 * document id + revision), so reading a project page does not re-render unchanged text.
 * Bounded: the oldest entries go first. A miss only costs a render.
 */
import { renderMarkdown, type RenderedMarkdown } from './render';

const LIMIT = 2_000;
const cache = new Map<string, { source: string; rendered: RenderedMarkdown }>();

export function renderCached(key: string, markdown: string, idPrefix: string): RenderedMarkdown {
  const hit = cache.get(key);
  // The source is compared too: a key reused for other text must not serve stale HTML.
  if (hit && hit.source === markdown) {
    cache.delete(key);
    cache.set(key, hit);
    return hit.rendered;
  }
  const rendered = renderMarkdown(markdown, { idPrefix });
  cache.set(key, { source: markdown, rendered });
  if (cache.size > LIMIT) cache.delete(cache.keys().next().value as string);
  return rendered;
}
