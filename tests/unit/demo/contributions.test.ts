import { readFileSync } from 'node:fs';
import type { Token } from 'markdown-it';
import { describe, expect, it } from 'vitest';
import { createMarkdownIt } from '../../../api/markdown/render';
import { demoAccounts } from '../../../db/demo/accounts';
import { demoContributions } from '../../../db/demo/contributions';
import type { DemoComment, DemoContributions, DemoErratumFields, DemoProject } from '../../../db/demo/types';
import { demoWriteUps } from '../../../db/demo/write-ups';
import {
  commentInputSchema,
  declineProposalSchema,
  erratumFieldsSchema,
  lessonInputSchema,
  proposalInputSchema,
  saveErratumSchema,
} from '../../../shared/contracts/errata';
import { erratumStatuses, severities, startingCategories } from '../../../shared/domain';

const accounts = new Map(demoAccounts.map((a) => [a.login, a]));
const categorySlugs = new Set<string>(startingCategories.map((c) => c.slug));

/** The approved vocabulary, read from the migration that creates it. */
function approvedTagsIn(sql: string): Set<string> {
  return new Set([...sql.matchAll(/^\s*\('([a-z0-9-]+)',.*'approved'\)[,;]?\s*$/gm)].map((m) => m[1]!));
}
const approvedTags = approvedTagsIn(
  readFileSync(new URL('../../../db/migrations/0004_tag_vocabulary.sql', import.meta.url), 'utf8'),
);

/**
 * The tags members create on purpose (pending, for moderators to curate): `adc-only-pin` is a
 * near-duplicate of the approved `analog-only-pin`, for a moderator to merge; `silkscreen` is new.
 */
const intendedNewTags = new Set(['adc-only-pin', 'silkscreen']);

// The product's parser runs with raw HTML off, so it never emits html_block/html_inline tokens:
// a text with `<br>` in it would quietly show the tag as text. Switching raw HTML recognition
// back on for this check makes such a text produce those tokens, so the check can fail.
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

function linkHostsIn(markdown: string): string[] {
  return tokensOf(markdown)
    .filter((t) => t.type === 'link_open' || t.type === 'image')
    .map((t) => new URL(String(t.attrGet('href') ?? t.attrGet('src'))).hostname);
}

function wordCount(text: string): number {
  return text.split(/\s+/).filter((w) => /[\p{L}\p{N}]/u.test(w)).length;
}

function sentenceCount(text: string): number {
  return (text.trim().match(/[.!?](?=\s|$)/g) ?? []).length;
}

const TEXT_FIELDS = ['symptom', 'cause', 'workaround', 'fix'] as const;

function writeUpOf(contributions: DemoContributions): DemoProject {
  const project = demoWriteUps.find((p) => p.slug === contributions.slug);
  if (!project) throw new Error(`no write-up for ${contributions.slug}`);
  return project;
}

/** Board labels to the numbers the seed would use as ids (1-based position). */
function boardNumbers(project: DemoProject): Map<string, number> {
  return new Map(project.boards.map((b, i) => [b.label, i + 1]));
}

function toContractFields(fields: DemoErratumFields, boards: Map<string, number>) {
  const id = (label: string) => boards.get(label) ?? -1;
  return {
    ...fields,
    affected: fields.affected.map(id),
    fixedIn: fields.fixedIn === null ? null : id(fields.fixedIn),
    reportedByText: fields.reportedByText ?? '',
  };
}

/** Every erratum-shaped field set in a project: all revisions and every proposal payload. */
function allFieldSets(c: DemoContributions): Array<{ where: string; fields: DemoErratumFields }> {
  return [
    ...c.errata.flatMap((e, i) =>
      e.revisions.map((r, j) => ({ where: `E${i + 1} revision ${j + 1}`, fields: r.fields })),
    ),
    ...c.proposals.flatMap((p, i) =>
      p.kind === 'document_edit' ? [] : [{ where: `proposal ${i + 1}`, fields: p.payload }],
    ),
  ];
}

function allComments(c: DemoContributions): Array<{ where: string; comment: DemoComment }> {
  return [
    ...c.errata.flatMap((e, i) => (e.comments ?? []).map((comment) => ({ where: `E${i + 1} comment`, comment }))),
    ...c.proposals.flatMap((p, i) =>
      (p.comments ?? []).map((comment) => ({ where: `proposal ${i + 1} comment`, comment })),
    ),
  ];
}

/** Every Markdown text: erratum texts, comments, lessons, proposed section bodies. */
function markdownTexts(c: DemoContributions): Array<{ where: string; text: string }> {
  return [
    ...allFieldSets(c).flatMap(({ where, fields }) =>
      TEXT_FIELDS.map((f) => ({ where: `${where} ${f}`, text: fields[f] })),
    ),
    ...allComments(c).map(({ where, comment }) => ({ where, text: comment.body })),
    ...c.lessons.map((l, i) => ({ where: `lesson ${i + 1}`, text: l.body })),
    ...c.proposals.flatMap((p, i) =>
      p.kind === 'document_edit' ? [{ where: `proposal ${i + 1} body`, text: p.payload.body }] : [],
    ),
  ];
}

function latestOf<T>(list: T[], what: string): T {
  const last = list.at(-1);
  if (last === undefined) throw new Error(`${what}: empty`);
  return last;
}

describe('the checks themselves', () => {
  it('find inline and block HTML, and nothing in plain Markdown', () => {
    expect(rawHtmlIn('Relay on A6<br>and D7')).toEqual(['<br>']);
    expect(rawHtmlIn('<div>\nbox\n</div>\n')).toHaveLength(1);
    expect(rawHtmlIn('VOL < 0.5 V and **bold** `<tag>` text')).toEqual([]);
  });

  it('read the approved tags from the migration, and only approved rows', () => {
    expect(approvedTags.size).toBe(28);
    expect(approvedTags).toContain('analog-only-pin');
    expect(approvedTags).toContain('documentation');
    expect(approvedTagsIn("  ('x-pin', 'X', 'd', 'pending'),\n  ('y-pin', 'Y', 'd', 'approved');")).toEqual(
      new Set(['y-pin']),
    );
  });

  it('count words and sentences the way the content rules mean them', () => {
    expect(wordCount('Cut the trace, then **solder** a wire: 30 AWG — done.')).toBe(10);
    expect(sentenceCount('VOL is 0.5 V at 2 mA. Check the table.')).toBe(2);
  });
});

describe('demo contributions', () => {
  it('belong to the three demo write-ups, in the same order', () => {
    expect(demoContributions.map((c) => c.slug)).toEqual(demoWriteUps.map((p) => p.slug));
  });

  it('use every severity and every erratum status somewhere', () => {
    const latest = demoContributions.flatMap((c) => c.errata.map((e) => latestOf(e.revisions, c.slug).fields));
    expect(new Set(latest.map((f) => f.severity))).toEqual(new Set(severities));
    expect(new Set(latest.map((f) => f.status))).toEqual(new Set(erratumStatuses));
  });

  it('create exactly the intended new tags, each first used by a member whose tags start out pending', () => {
    const firstUse = new Map<string, { author: string; slug: string; daysAgo: number }>();
    for (const c of demoContributions) {
      for (const lesson of c.lessons) {
        for (const tag of lesson.tags.filter((t) => !approvedTags.has(t))) {
          const seen = firstUse.get(tag);
          if (!seen || seen.daysAgo < lesson.daysAgo)
            firstUse.set(tag, { author: lesson.author, slug: c.slug, daysAgo: lesson.daysAgo });
        }
      }
    }
    expect(new Set(firstUse.keys())).toEqual(intendedNewTags);
    for (const [tag, use] of firstUse) {
      expect(accounts.get(use.author)?.role, tag).toBe('member');
      const project = demoWriteUps.find((p) => p.slug === use.slug)!;
      expect([project.owner, ...project.editors], tag).toContain(use.author);
    }
  });

  describe.each(demoContributions.map((c) => [c.slug, c] as const))('%s', (_slug, c) => {
    const project = writeUpOf(c);
    const members = new Set([project.owner, ...project.editors]);
    const boards = boardNumbers(project);
    const boardLabels = new Set(project.boards.map((b) => b.label));

    it('has errata written only by project members, with reporters who are demo accounts', () => {
      expect(c.errata.length).toBeGreaterThanOrEqual(3);
      for (const [i, erratum] of c.errata.entries()) {
        for (const r of erratum.revisions) {
          expect(accounts.has(r.author), `E${i + 1}`).toBe(true);
          expect(members, `E${i + 1}`).toContain(r.author);
        }
        if (erratum.reportedBy !== undefined) expect(accounts.has(erratum.reportedBy), `E${i + 1}`).toBe(true);
      }
    });

    it('lists erratum revisions oldest first, each changing something, and numbers errata in the order they were recorded', () => {
      for (const [i, erratum] of c.errata.entries()) {
        const where = `E${i + 1}`;
        expect(erratum.revisions.length, where).toBeGreaterThanOrEqual(1);
        expect(erratum.revisions.length, where).toBeLessThanOrEqual(3);
        for (const r of erratum.revisions) expect(r.daysAgo, where).toBeGreaterThanOrEqual(0);
        for (let j = 1; j < erratum.revisions.length; j++) {
          const [before, after] = [erratum.revisions[j - 1]!, erratum.revisions[j]!];
          expect(after.daysAgo, where).toBeLessThan(before.daysAgo);
          expect(after.fields, where).not.toEqual(before.fields);
        }
        if (i > 0) expect(erratum.revisions[0]!.daysAgo, where).toBeLessThan(c.errata[i - 1]!.revisions[0]!.daysAgo);
      }
    });

    it('names only board revisions of this project, and fixes a defect only in a later one', () => {
      const position = (label: string) => project.boards.findIndex((b) => b.label === label);
      for (const { where, fields } of allFieldSets(c)) {
        for (const label of fields.affected) expect(boardLabels, where).toContain(label);
        expect(fields.status === 'fixed_later', where).toBe(fields.fixedIn !== null);
        if (fields.fixedIn !== null) {
          expect(boardLabels, where).toContain(fields.fixedIn);
          for (const label of fields.affected) expect(position(label), where).toBeLessThan(position(fields.fixedIn));
        }
      }
    });

    it('has errata for every board revision of the project', () => {
      const named = new Set(
        c.errata.flatMap((e) => {
          const f = latestOf(e.revisions, c.slug).fields;
          return [...f.affected, ...(f.fixedIn ? [f.fixedIn] : [])];
        }),
      );
      expect(named).toEqual(boardLabels);
    });

    it('uses known categories, approved erratum tags and reference designators that look like ones', () => {
      for (const { where, fields } of allFieldSets(c)) {
        expect(categorySlugs, where).toContain(fields.category);
        for (const refdes of fields.refdes) expect(refdes, where).toMatch(/^[A-Z]{1,3}\d{1,4}$/);
      }
      for (const [i, erratum] of c.errata.entries()) {
        for (const tag of erratum.tags) expect(approvedTags, `E${i + 1}`).toContain(tag);
      }
    });

    it('fits the erratum contract once board labels are board numbers, without the contract dropping anything', () => {
      for (const { where, fields } of allFieldSets(c)) {
        const input = toContractFields(fields, boards);
        const result = erratumFieldsSchema.safeParse(input);
        expect(result.error?.issues ?? [], where).toEqual([]);
        // The contract quietly removes duplicate or blank list entries and sorts affected ids:
        // demo data that needs any of that is a mistake in the data.
        expect(result.data, where).toEqual(input);
      }
    });

    it('fits the save contracts for errata, lessons, proposals, decline reasons and comments', () => {
      for (const [i, erratum] of c.errata.entries()) {
        for (const r of erratum.revisions) {
          const input = { ...toContractFields(r.fields, boards), tags: erratum.tags, message: r.message };
          expect(saveErratumSchema.safeParse(input).error?.issues ?? [], `E${i + 1}: ${r.message}`).toEqual([]);
        }
      }
      for (const [i, lesson] of c.lessons.entries()) {
        const input = { body: lesson.body, tags: lesson.tags, errata: lesson.errata };
        expect(lessonInputSchema.safeParse(input).error?.issues ?? [], `lesson ${i + 1}`).toEqual([]);
      }
      for (const [i, p] of c.proposals.entries()) {
        const where = `proposal ${i + 1}`;
        // Ids and base revisions are the seed's to fill in; any valid number stands in for them here.
        const input =
          p.kind === 'new_erratum'
            ? { kind: p.kind, payload: toContractFields(p.payload, boards), message: p.message }
            : p.kind === 'erratum_edit'
              ? {
                  kind: p.kind,
                  erratumNumber: p.erratumNumber,
                  baseRevision: 1,
                  payload: toContractFields(p.payload, boards),
                  message: p.message,
                }
              : {
                  kind: p.kind,
                  documentId: 1,
                  baseRevision: 1,
                  payload: { ...p.payload, loggedOn: null },
                  message: p.message,
                };
        expect(proposalInputSchema.safeParse(input).error?.issues ?? [], where).toEqual([]);
        if (p.reason !== undefined) {
          expect(declineProposalSchema.safeParse({ reason: p.reason }).error?.issues ?? [], where).toEqual([]);
        }
      }
      for (const { where, comment } of allComments(c)) {
        expect(commentInputSchema.safeParse({ body: comment.body }).error?.issues ?? [], where).toEqual([]);
      }
    });

    it('writes symptom, cause, workaround and fix in 30 to 200 words, all four filled in by the latest revision', () => {
      for (const { where, fields } of allFieldSets(c)) {
        for (const field of TEXT_FIELDS) {
          if (fields[field] === '') continue;
          const words = wordCount(fields[field]);
          expect(words, `${where} ${field}`).toBeGreaterThanOrEqual(30);
          expect(words, `${where} ${field}`).toBeLessThanOrEqual(200);
        }
      }
      for (const [i, erratum] of c.errata.entries()) {
        const latest = latestOf(erratum.revisions, `E${i + 1}`).fields;
        for (const field of TEXT_FIELDS) expect(latest[field].trim(), `E${i + 1} ${field}`).not.toBe('');
      }
    });

    it('writes Markdown without raw HTML and links only to the reserved example.org domain', () => {
      for (const { where, text } of markdownTexts(c)) {
        expect(rawHtmlIn(text), where).toEqual([]);
        for (const host of linkHostsIn(text)) {
          expect(host === 'example.org' || host.endsWith('.example.org'), `${where}: ${host}`).toBe(true);
        }
      }
    });

    it('keeps discussions by demo accounts, oldest first, after what they discuss was written', () => {
      const threads = [
        ...c.errata.map((e, i) => ({ where: `E${i + 1}`, since: e.revisions[0]!.daysAgo, comments: e.comments ?? [] })),
        ...c.proposals.map((p, i) => ({ where: `proposal ${i + 1}`, since: p.daysAgo, comments: p.comments ?? [] })),
      ];
      for (const { where, since, comments } of threads) {
        for (const [j, comment] of comments.entries()) {
          expect(accounts.has(comment.author), where).toBe(true);
          expect(comment.body.trim(), where).not.toBe('');
          expect(comment.daysAgo, where).toBeGreaterThanOrEqual(0);
          expect(comment.daysAgo, where).toBeLessThan(since);
          if (j > 0) expect(comment.daysAgo, where).toBeLessThan(comments[j - 1]!.daysAgo);
        }
      }
    });

    it('has short tagged lessons by members, linked to errata recorded before them', () => {
      expect(c.lessons.length).toBeGreaterThanOrEqual(3);
      for (const [i, lesson] of c.lessons.entries()) {
        const where = `lesson ${i + 1}`;
        expect(members, where).toContain(lesson.author);
        expect(lesson.daysAgo, where).toBeGreaterThanOrEqual(0);
        expect(lesson.tags.length, where).toBeGreaterThanOrEqual(1);
        expect(lesson.tags.length, where).toBeLessThanOrEqual(3);
        for (const tag of lesson.tags)
          expect(approvedTags.has(tag) || intendedNewTags.has(tag), `${where}: ${tag}`).toBe(true);
        expect(sentenceCount(lesson.body), where).toBeGreaterThanOrEqual(1);
        expect(sentenceCount(lesson.body), where).toBeLessThanOrEqual(2);
        for (const n of lesson.errata) {
          const erratum = c.errata[n - 1];
          expect(erratum, `${where}: E${n}`).toBeDefined();
          expect(lesson.daysAgo, `${where}: E${n}`).toBeLessThan(erratum!.revisions[0]!.daysAgo);
        }
      }
    });

    it('has proposals from contributors, decided by members, with the decision fields their status needs', () => {
      for (const [i, p] of c.proposals.entries()) {
        const where = `proposal ${i + 1}`;
        expect(accounts.has(p.author), where).toBe(true);
        // Members edit directly; a proposal is how someone outside the project suggests a change.
        expect(members.has(p.author), where).toBe(false);
        expect(p.daysAgo, where).toBeGreaterThanOrEqual(0);
        expect(p.message.trim(), where).not.toBe('');
        if (p.status === 'open') {
          expect([p.decidedBy, p.decidedDaysAgo, p.reason], where).toEqual([undefined, undefined, undefined]);
          continue;
        }
        expect(p.decidedDaysAgo, where).toBeDefined();
        expect(p.decidedDaysAgo!, where).toBeLessThan(p.daysAgo);
        expect(p.decidedDaysAgo!, where).toBeGreaterThanOrEqual(0);
        if (p.status === 'withdrawn') {
          expect(p.decidedBy, where).toBeUndefined();
        } else {
          expect(members, where).toContain(p.decidedBy);
        }
        if (p.status === 'declined') expect(p.reason?.trim(), where).toBeTruthy();
        else expect(p.reason, where).toBeUndefined();
      }
    });

    it('proposes erratum edits against the latest revision of an existing erratum, changing a little', () => {
      for (const [i, p] of c.proposals.entries()) {
        if (p.kind !== 'erratum_edit') continue;
        const where = `proposal ${i + 1}`;
        const target = c.errata[p.erratumNumber - 1];
        expect(target, where).toBeDefined();
        const latest = latestOf(target!.revisions, where);
        expect(p.daysAgo, where).toBeLessThan(latest.daysAgo);
        const changed = (Object.keys(p.payload) as Array<keyof DemoErratumFields>).filter(
          (key) => JSON.stringify(p.payload[key]) !== JSON.stringify(latest.fields[key]),
        );
        expect(changed.length, where).toBeGreaterThanOrEqual(1);
        expect(changed.length, where).toBeLessThanOrEqual(2);
        expect(Object.keys(p.payload).sort(), where).toEqual(Object.keys(latest.fields).sort());
      }
    });

    it('proposes section edits against the current text, changing one paragraph', () => {
      for (const [i, p] of c.proposals.entries()) {
        if (p.kind !== 'document_edit') continue;
        const where = `proposal ${i + 1}`;
        const section = project.sections.find((s) => latestOf(s.revisions, where).title === p.sectionTitle);
        expect(section, where).toBeDefined();
        const current = latestOf(section!.revisions, where);
        expect(p.daysAgo, where).toBeLessThan(current.daysAgo);
        expect(p.payload.title, where).toBe(current.title);
        const before = current.body.split('\n\n');
        const after = p.payload.body.split('\n\n');
        expect(after.length, where).toBe(before.length);
        expect(after.filter((paragraph, j) => paragraph !== before[j]).length, where).toBe(1);
      }
    });

    it('is followed by demo accounts from outside the project, each once', () => {
      for (const login of c.followers) {
        expect(accounts.has(login), login).toBe(true);
        expect(members.has(login), login).toBe(false);
      }
      expect(new Set(c.followers).size).toBe(c.followers.length);
    });
  });
});
