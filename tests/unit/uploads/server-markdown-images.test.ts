/**
 * Uploaded photos in rendered Markdown: drawn from the page's image map (srcset, sizes, size,
 * lazy loading, the upload's alt text), other uploads not shown, and srcset/sizes limited to what
 * the renderer writes — checked by parsing the HTML with htmlparser2.
 *
 * Hostile srcset values follow the URL tricks of the OWASP XSS Filter Evasion Cheat Sheet
 * (cheatsheetseries.owasp.org) carried into srcset (written for this suite).
 */
import { Parser } from 'htmlparser2';
import { describe, expect, it } from 'vitest';
import { renderCached } from '../../../api/markdown/cache';
import { renderMarkdown, sanitizeRendered, type MarkdownImage } from '../../../api/markdown/render';

function images(html: string): Record<string, string>[] {
  const found: Record<string, string>[] = [];
  const parser = new Parser(
    {
      onopentag(name, attribs) {
        if (name === 'img') found.push(attribs);
      },
    },
    { decodeEntities: true, lowerCaseAttributeNames: true },
  );
  parser.write(html);
  parser.end();
  return found;
}

const ready: MarkdownImage = {
  src: '/api/uploads/12/page.webp',
  srcset: '/api/uploads/12/thumb.webp 400w, /api/uploads/12/page.webp 1400w, /api/uploads/12/full.webp 2800w',
  sizes: '(max-width: 800px) 100vw, 800px',
  width: 1400,
  height: 1050,
  alt: 'Bodge wire from D7 to the relay input',
};
const processing: MarkdownImage = { src: '/api/uploads/13/original.jpg', srcset: null, sizes: null, width: 4000, height: 3000, alt: '' };
const map = new Map([
  ['12', ready],
  ['13', processing],
]);

describe('uploaded photos in Markdown', () => {
  it('get srcset, sizes, width, height, lazy loading and async decoding from the image map', () => {
    const [img] = images(renderMarkdown('![Rev B relay bodge](/api/uploads/12/page.webp "Caption: the fix")', { images: map }).html);
    expect(img).toEqual({
      src: '/api/uploads/12/page.webp',
      alt: 'Rev B relay bodge',
      title: 'Caption: the fix',
      srcset: ready.srcset,
      sizes: ready.sizes,
      width: '1400',
      height: '1050',
      loading: 'lazy',
      decoding: 'async',
    });
  });

  it('take the upload’s alt text when the Markdown gives none, and keep the Markdown’s when it does', () => {
    expect(images(renderMarkdown('![](/api/uploads/12/page.webp)', { images: map }).html)[0]!.alt).toBe(ready.alt);
    expect(images(renderMarkdown('![  ](/api/uploads/12/thumb.webp)', { images: map }).html)[0]!.alt).toBe(ready.alt);
    expect(images(renderMarkdown('![Scope trace](/api/uploads/12/page.webp)', { images: map }).html)[0]!.alt).toBe('Scope trace');
  });

  it('show a photo still processing from its original, without srcset', () => {
    const [img] = images(renderMarkdown('![Board](/api/uploads/13/page.webp)', { images: map }).html);
    expect(img).toMatchObject({ src: '/api/uploads/13/original.jpg', width: '4000', height: '3000', loading: 'lazy' });
    expect(img).not.toHaveProperty('srcset');
    expect(img).not.toHaveProperty('sizes');
  });

  it('show an upload the map does not have (another project’s, a deleted one) as its alt text only', () => {
    const { html } = renderMarkdown('Before ![someone else’s board](/api/uploads/99/page.webp) after', { images: map });
    expect(images(html)).toEqual([]);
    expect(html).toContain('someone else’s board');
    expect(html).not.toContain('/api/uploads/99');
  });

  it('leave our images as written when the caller resolves none, and other images alone', () => {
    expect(images(renderMarkdown('![x](/api/uploads/99/page.webp)').html)[0]).toEqual({ src: '/api/uploads/99/page.webp', alt: 'x' });
    expect(images(renderMarkdown('![x](https://example.org/a.png)', { images: map }).html)[0]).toEqual({ src: 'https://example.org/a.png', alt: 'x' });
  });

  it('leave links to attachments as links', () => {
    const { html } = renderMarkdown('[schematic.pdf](/api/uploads/14/original.pdf)', { images: map });
    expect(html).toContain('href="/api/uploads/14/original.pdf"');
  });
});

describe('srcset and sizes cannot be used to inject anything', () => {
  const hostile: [string, Partial<MarkdownImage>][] = [
    ['a srcset naming another host', { srcset: 'https://evil.invalid/a.png 400w' }],
    ['a protocol-relative candidate after a good one', { srcset: '/api/uploads/12/page.webp 400w, //evil.invalid/b.png 800w' }],
    ['a javascript: candidate', { srcset: 'javascript:alert(1) 1x' }],
    ['a candidate with a path out of the uploads', { srcset: '/api/uploads/12/../../me 400w' }],
    ['sizes carrying an attribute break-out', { sizes: '100vw" onerror="alert(1)' }],
  ];
  for (const [name, change] of hostile) {
    it(`drops ${name}`, () => {
      const evil = new Map([['12', { ...ready, ...change }]]);
      const [img] = images(renderMarkdown('![x](/api/uploads/12/page.webp)', { images: evil }).html);
      const field = Object.keys(change)[0] as 'srcset' | 'sizes';
      expect(img![field]).toBeUndefined();
      expect(Object.keys(img!).some((a) => a.startsWith('on'))).toBe(false);
    });
  }

  it('refuses a map entry whose src is not one of our files (it is shown as alt text)', () => {
    const evil = new Map([['12', { ...ready, src: 'https://evil.invalid/track.png' }]]);
    expect(images(renderMarkdown('![x](/api/uploads/12/page.webp)', { images: evil }).html)).toEqual([]);
  });

  it('holds in the sanitizer alone, for raw HTML that tries the same', () => {
    const html = sanitizeRendered(
      '<img src="/api/uploads/1/page.webp" srcset="https://evil.invalid/a.png 2x" sizes="1px" loading="eager" decoding="sync" width="100%" height="1e9">',
    );
    expect(images(html)[0]).toEqual({ src: '/api/uploads/1/page.webp' });
  });

  it('keeps in the sanitizer exactly the srcset shape the renderer writes', () => {
    const html = sanitizeRendered(`<img src="/api/uploads/1/page.webp" srcset="${ready.srcset}" sizes="${ready.sizes}" loading="lazy" decoding="async">`);
    expect(images(html)[0]).toMatchObject({ srcset: ready.srcset, sizes: ready.sizes, loading: 'lazy', decoding: 'async' });
  });
});

describe('the render cache', () => {
  it('serves new HTML when the image map changes though the text did not (variants became ready)', () => {
    const markdown = '![](/api/uploads/13/page.webp)';
    const before = renderCached('test:cache:1', markdown, 'd1-', new Map([['13', processing]])).html;
    const after = renderCached('test:cache:1', markdown, 'd1-', new Map([['13', { ...ready, src: '/api/uploads/13/page.webp', alt: 'Now described' }]])).html;
    expect(images(before)[0]!.src).toBe('/api/uploads/13/original.jpg');
    expect(images(after)[0]).toMatchObject({ src: '/api/uploads/13/page.webp', alt: 'Now described' });
    // And the first state again is still right (its entry was kept under its own digest).
    expect(renderCached('test:cache:1', markdown, 'd1-', new Map([['13', processing]])).html).toBe(before);
  });
});
