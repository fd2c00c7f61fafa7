/**
 * Every hostile payload, rendered by the server and shown by the client on a real project
 * page in Chromium, runs no script. Payload sources: OWASP XSS Filter Evasion Cheat Sheet and
 * markdown-it's own XSS fixtures (test/fixtures/markdown-it/xss.txt); see the fixture file.
 *
 * The page gets tripwires before any of its own code runs: alert/confirm/prompt/print and a
 * global the payloads could call are recorded, and any script the Content-Security-Policy had
 * to stop (eval included) shows as a console violation. Hovering every element and clicking
 * every link inside the rendered write-up tries the interaction-triggered payloads.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { saveDocument } from '../../api/documents/service';
import { createProject, setPublished } from '../../api/projects/service';
import { findProjectBySlug } from '../../api/projects/queries';
import { findUserByHandle } from '../../api/users/queries';
import { toAuthUser } from '../../api/users/service';
import { hostileMarkdown } from '../fixtures/hostile-markdown';
import { startProduct, type Product } from '../setup/browser';

let product: Product;
let slug: string;

beforeAll(async () => {
  product = await startProduct();
  const ctx = product.server.ctx;
  const user = toAuthUser((await findUserByHandle(ctx.db, 'ilse-marrow'))!);
  const created = await createProject(ctx, user, { title: 'Hostile Markdown', summary: 'every payload', licence: 'MIT', hazards: [] });
  slug = created.slug;
  const project = (await findProjectBySlug(ctx.db, slug))!;
  // All payloads in one section, each under its own heading, so one page load covers them all.
  // NUL cannot be stored (the API refuses it with 400); CommonMark reads it as U+FFFD anyway.
  const body = hostileMarkdown
    .map((p) => `## ${p.name.replace(/[#\n]/g, ' ')}\n\n${p.markdown.replace(/\u0000/g, '\uFFFD')}\n`)
    .join('\n');
  const section = created.sections[0]!;
  await saveDocument(ctx, user, project, 'owner', section.id, { title: 'Overview', body, loggedOn: null, message: 'payloads' }, 1);
  await setPublished(ctx, user, project, 'owner', true);
});

afterAll(async () => {
  await product?.close();
});

describe('hostile Markdown in Chromium', () => {
  it(`runs no script from any of the ${hostileMarkdown.length} payloads`, async () => {
    const { page } = await product.newPage();
    const fired: string[] = [];
    await page.exposeFunction('__tripwire', (what: string) => fired.push(what));
    await page.addInitScript(() => {
      const w = window as unknown as Record<string, unknown> & { __tripwire: (what: string) => void };
      for (const name of ['alert', 'confirm', 'prompt', 'print']) {
        w[name] = (...args: unknown[]) => w.__tripwire(`${name}(${args.map(String).join(',')})`);
      }
      w.xss = () => w.__tripwire('xss()');
    });
    page.on('dialog', (dialog) => {
      fired.push(`dialog: ${dialog.message()}`);
      void dialog.dismiss();
    });
    const violations: string[] = [];
    page.on('console', (message) => {
      if (/Content Security Policy/i.test(message.text())) violations.push(message.text());
    });

    await page.goto(`/projects/${slug}`);
    const content = page.locator('.write-up-section .rendered').first();
    await content.waitFor();
    // The payload headings all made it to the page: the content really rendered.
    expect(await page.locator('.write-up-section h2[id]').count()).toBeGreaterThanOrEqual(hostileMarkdown.length);

    // Interaction-triggered payloads: hover everything, click every link (navigation prevented).
    await page.evaluate(() => {
      document.addEventListener('click', (event) => event.preventDefault(), true);
    });
    const elements = await content.locator('*').all();
    for (const element of elements.slice(0, 1500)) await element.hover({ force: true, timeout: 500 }).catch(() => {});
    for (const link of await content.locator('a').all()) await link.click({ force: true, timeout: 500 }).catch(() => {});
    await page.waitForTimeout(300);

    const dangerous = await page.evaluate(() => {
      const root = document.querySelector('.write-up-section .rendered')!;
      const found: string[] = [];
      for (const el of root.querySelectorAll('*')) {
        const tag = el.tagName.toLowerCase();
        if (['script', 'iframe', 'object', 'embed', 'svg', 'math', 'style', 'form', 'meta', 'base', 'link'].includes(tag)) found.push(tag);
        for (const attr of el.getAttributeNames()) if (attr.startsWith('on') || attr === 'style') found.push(`${tag}[${attr}]`);
        for (const attr of ['href', 'src']) {
          const value = el.getAttribute(attr);
          if (value === null) continue;
          const protocol = new URL(value, location.href).protocol;
          if (!['http:', 'https:', 'mailto:'].includes(protocol)) found.push(`${tag}[${attr}=${value}]`);
        }
      }
      return found;
    });
    expect(dangerous).toEqual([]);
    expect(fired).toEqual([]);
    // Template syntax stays text: Vue never compiles server HTML.
    expect(await content.textContent()).toContain('{{ 7*7 }}');
    expect(violations, 'no payload even tried to load a script the CSP had to stop').toEqual([]);
  });
});
