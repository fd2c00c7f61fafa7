import type { Token } from 'markdown-it';
import { describe, expect, it } from 'vitest';
import { createMarkdownIt } from '../../../api/markdown/render';
import { demoAccounts } from '../../../db/demo/accounts';
import type { DemoDocument, DemoProject } from '../../../db/demo/types';
import { demoWriteUps } from '../../../db/demo/write-ups';
import { boardRevisionInputSchema, createProjectSchema, saveDocumentSchema } from '../../../shared/contracts/projects';

const logins = new Set(demoAccounts.map((a) => a.login));

// The product's parser runs with raw HTML off, so it never emits html_block/html_inline tokens:
// a body with `<br>` in it would quietly show the tag as text. Switching raw HTML recognition
// back on for this check makes such a body produce those tokens, so the check can fail.
const md = createMarkdownIt().set({ html: true });

function tokensOf(markdown: string): Token[] {
  const flat: Token[] = [];
  const visit = (list: Token[]) => {
    for (const token of list) {
      flat.push(token);
      if (token.children) visit(token.children);
    }
  };
  visit(md.parse(markdown, {}));
  return flat;
}

function rawHtmlIn(markdown: string): string[] {
  return tokensOf(markdown)
    .filter((t) => t.type === 'html_block' || t.type === 'html_inline')
    .map((t) => t.content.trim());
}

function isIsoDate(value: string): boolean {
  if (!/^\d{4}-\d{2}-\d{2}$/.test(value)) return false;
  const parsed = new Date(`${value}T00:00:00Z`);
  return !Number.isNaN(parsed.getTime()) && parsed.toISOString().slice(0, 10) === value;
}

function documentsOf(project: DemoProject): Array<{ label: string; doc: DemoDocument; loggedOn: string | null }> {
  return [
    ...project.sections.map((doc, i) => ({ label: `section ${i + 1}`, doc, loggedOn: null })),
    ...project.logEntries.map((doc) => ({ label: `log entry ${doc.loggedOn}`, doc, loggedOn: doc.loggedOn })),
  ];
}

function markdownBodies(project: DemoProject): Array<{ where: string; body: string }> {
  return [
    ...documentsOf(project).flatMap(({ label, doc }) =>
      doc.revisions.map((r, i) => ({ where: `${label}, revision ${i + 1}`, body: r.body })),
    ),
    ...project.boards.map((b) => ({ where: `board ${b.label} notes`, body: b.notes })),
  ];
}

describe('the raw-HTML check itself', () => {
  it('finds inline and block HTML, and nothing in plain Markdown', () => {
    expect(rawHtmlIn('Relay on A6<br>and D7')).toEqual(['<br>']);
    expect(rawHtmlIn('<div>\nbox\n</div>\n')).toHaveLength(1);
    expect(rawHtmlIn('VOL < 0.5 V and **bold** `<tag>` text')).toEqual([]);
  });
});

describe('demo write-ups', () => {
  it('are the three invented projects, each slug once', () => {
    const slugs = demoWriteUps.map((p) => p.slug);
    expect(slugs).toEqual(['greenhouse-vent-controller', 'bench-supply-monitor', 'tide-clock']);
  });

  describe.each(demoWriteUps.map((p) => [p.slug, p] as const))('%s', (_slug, project) => {
    const members = new Set([project.owner, ...project.editors]);

    it('is owned and edited by demo accounts', () => {
      expect(logins).toContain(project.owner);
      for (const editor of project.editors) expect(logins).toContain(editor);
    });

    it('has every revision written by a demo account that is the owner or an editor', () => {
      const authors = [
        ...project.meta.map((m) => m.author),
        ...documentsOf(project).flatMap(({ doc }) => doc.revisions.map((r) => r.author)),
      ];
      for (const author of authors) {
        expect(logins).toContain(author);
        expect(members).toContain(author);
      }
    });

    it('lists metadata and document revisions oldest first, each changing something', () => {
      const meta = project.meta.map((m) => m.daysAgo);
      expect(meta.length).toBeGreaterThanOrEqual(2);
      for (let i = 1; i < meta.length; i++) expect(meta[i]).toBeLessThan(meta[i - 1]!);
      for (let i = 1; i < project.meta.length; i++) {
        const { author: _a, daysAgo: _d, message: _m, ...before } = project.meta[i - 1]!;
        const { author: _b, daysAgo: _e, message: _n, ...after } = project.meta[i]!;
        expect(after).not.toEqual(before);
      }
      for (const { label, doc } of documentsOf(project)) {
        expect(doc.revisions.length, label).toBeGreaterThanOrEqual(1);
        for (let i = 1; i < doc.revisions.length; i++) {
          const [before, after] = [doc.revisions[i - 1]!, doc.revisions[i]!];
          expect(after.daysAgo, label).toBeLessThan(before.daysAgo);
          expect(`${after.title}\n${after.body}`, label).not.toBe(`${before.title}\n${before.body}`);
        }
        for (const r of doc.revisions) expect(r.daysAgo, label).toBeGreaterThanOrEqual(0);
      }
    });

    it('gives every section and log entry a non-empty title', () => {
      for (const { label, doc } of documentsOf(project)) {
        for (const r of doc.revisions) expect(r.title.trim(), label).not.toBe('');
      }
    });

    it('dates log entries and board revisions with valid ISO dates', () => {
      for (const entry of project.logEntries) expect(isIsoDate(entry.loggedOn), entry.loggedOn).toBe(true);
      for (const board of project.boards) {
        if (board.releasedOn !== null) expect(isIsoDate(board.releasedOn), board.label).toBe(true);
      }
    });

    it('writes Markdown without raw HTML and without an h1 (the page title is the h1)', () => {
      for (const { where, body } of markdownBodies(project)) {
        expect(rawHtmlIn(body), where).toEqual([]);
        const h1 = tokensOf(body).filter((t) => t.type === 'heading_open' && t.tag === 'h1');
        expect(h1, where).toEqual([]);
      }
    });

    it('links only to the reserved example.org domain', () => {
      const hosts = markdownBodies(project).flatMap(({ body }) =>
        tokensOf(body)
          .filter((t) => t.type === 'link_open')
          .map((t) => new URL(String(t.attrGet('href'))).hostname),
      );
      const urls = [...hosts, ...project.meta.filter((m) => m.repoUrl).map((m) => new URL(m.repoUrl).hostname)];
      expect(urls.length).toBeGreaterThan(0);
      for (const host of urls) expect(host === 'example.org' || host.endsWith('.example.org'), host).toBe(true);
    });

    it('fits the contracts the product saves with', () => {
      for (const m of project.meta) {
        const result = createProjectSchema.safeParse({
          slug: project.slug,
          title: m.title,
          summary: m.summary,
          licence: m.licence,
          licenceOther: m.licenceOther ?? '',
          repoUrl: m.repoUrl,
          hazards: m.hazards,
        });
        expect(result.error?.issues ?? [], m.message).toEqual([]);
      }
      for (const board of project.boards) {
        expect(boardRevisionInputSchema.safeParse(board).error?.issues ?? [], board.label).toEqual([]);
      }
      for (const { label, doc, loggedOn } of documentsOf(project)) {
        for (const r of doc.revisions) {
          const result = saveDocumentSchema.safeParse({ title: r.title, body: r.body, loggedOn, message: r.message });
          expect(result.error?.issues ?? [], label).toEqual([]);
        }
      }
    });
  });
});
