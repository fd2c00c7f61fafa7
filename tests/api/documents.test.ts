import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, type SignedInAgent, type TestApp } from '../setup/app';

let t: TestApp;
let maker: SignedInAgent;
let slug: string;

beforeAll(async () => {
  t = await createTestApp();
  maker = await t.signIn('ilse-marrow');
  const res = await maker.agent
    .post('/api/projects')
    .set(maker.headers)
    .send({ title: 'Write-up Tests', summary: '', licence: 'MIT', hazards: [] })
    .expect(201);
  slug = res.body.slug;
});
afterAll(async () => {
  await t.close();
});

interface Doc {
  id: number;
  revision: number;
  title: string;
  body: string;
}

async function newSection(title: string, body = ''): Promise<Doc> {
  const res = await maker.agent.post(`/api/projects/${slug}/sections`).set(maker.headers).send({ title, body }).expect(201);
  return res.body as Doc;
}

function save(id: number, body: Record<string, unknown>, headers: Record<string, string> = {}) {
  return maker.agent.put(`/api/projects/${slug}/documents/${id}`).set(maker.headers).set(headers).send(body);
}

async function revisionNumbers(id: number): Promise<number[]> {
  const rows = await t.ctx.db.execute<{ number: number }>(
    sql`SELECT number FROM revisions WHERE subject = 'document' AND subject_id = ${id} ORDER BY number`,
  );
  return rows.rows.map((r) => r.number);
}

const lines = (...l: string[]) => `${l.join('\n')}\n`;

describe('saving a section', () => {
  it('creates a new revision on each change, and none when nothing changed', async () => {
    const doc = await newSection('Hardware', 'First draft\n');
    expect(doc.revision).toBe(1);
    const first = await save(doc.id, { baseRevision: 1, title: 'Hardware', body: 'Second draft\n', message: 'reword' }).expect(200);
    expect(first.body).toMatchObject({ outcome: 'saved', mergedWith: null, document: { revision: 2, body: 'Second draft\n' } });
    expect(first.headers.etag).toBe('"2"');
    const same = await save(doc.id, { baseRevision: 2, title: 'Hardware', body: 'Second draft\n' }).expect(200);
    expect(same.body.outcome).toBe('unchanged');
    expect(await revisionNumbers(doc.id)).toEqual([1, 2]);
  });

  it('refuses a save that does not say what it was based on (428)', async () => {
    const doc = await newSection('No Base', 'text\n');
    const res = await save(doc.id, { title: 'No Base', body: 'changed\n' }).expect(428);
    expect(res.body.error.code).toBe('precondition_required');
    expect((await maker.agent.get(`/api/projects/${slug}/documents/${doc.id}`)).body.body).toBe('text\n');
  });

  it('accepts the base revision as an If-Match header', async () => {
    const doc = await newSection('If Match', 'a\n');
    const res = await save(doc.id, { title: 'If Match', body: 'b\n' }, { 'If-Match': '"1"' }).expect(200);
    expect(res.body.document.revision).toBe(2);
  });

  it('refuses a base revision from the future', async () => {
    const doc = await newSection('Future', 'a\n');
    await save(doc.id, { baseRevision: 7, title: 'Future', body: 'b\n' }).expect(400);
  });

  it('is refused to members who do not edit the project, changing nothing', async () => {
    const doc = await newSection('Guarded', 'mine\n');
    await maker.agent.post(`/api/projects/${slug}/publish`).set(maker.headers).expect(200);
    const stranger = await t.signIn('bram-tolliver');
    const res = await stranger.agent
      .put(`/api/projects/${slug}/documents/${doc.id}`)
      .set(stranger.headers)
      .send({ baseRevision: 1, title: 'Guarded', body: 'theirs\n' });
    expect(res.status).toBe(403);
    expect(await revisionNumbers(doc.id)).toEqual([1]);
    await maker.agent.post(`/api/projects/${slug}/unpublish`).set(maker.headers).expect(200);
  });
});

describe('no lost updates', () => {
  it('merges edits that do not overlap, line by line, and says so', async () => {
    const base = lines('# Hardware', '', 'The relay sits on A6.', '', 'Power comes from a 5 V regulator.', '', '## Notes', '', 'None yet.');
    const doc = await newSection('Merge', base);
    // Writer one changes the first paragraph and saves first.
    await save(doc.id, { baseRevision: 1, title: 'Merge', body: base.replace('The relay sits on A6.', 'The relay sits on D7.') }).expect(200);
    // Writer two, still on revision 1, changes the last paragraph.
    const res = await save(doc.id, { baseRevision: 1, title: 'Merge', body: base.replace('None yet.', 'Use a bigger regulator.') }).expect(200);
    expect(res.body.outcome).toBe('merged');
    expect(res.body.mergedWith).toEqual({ base: 1, theirs: 2 });
    expect(res.body.document.body).toBe(
      lines('# Hardware', '', 'The relay sits on D7.', '', 'Power comes from a 5 V regulator.', '', '## Notes', '', 'Use a bigger regulator.'),
    );
    const history = (await maker.agent.get(`/api/projects/${slug}/documents/${doc.id}/revisions`)).body.items;
    expect(history[0]).toMatchObject({ number: 3, origin: 'merge', parentNumber: 2 });
  });

  it('answers 409 with the current text and the conflicting region when edits overlap, saving nothing', async () => {
    const base = lines('Intro', 'The regulator is an LDO.', 'Outro');
    const doc = await newSection('Clash', base);
    await save(doc.id, { baseRevision: 1, title: 'Clash', body: lines('Intro', 'The regulator is a buck converter.', 'Outro') }).expect(200);
    const res = await save(doc.id, { baseRevision: 1, title: 'Clash', body: lines('Intro', 'The regulator is an LDO (AMS1117-style).', 'Outro') }).expect(409);
    expect(res.body.error.code).toBe('edit_conflict');
    const details = res.body.error.details;
    expect(details.current).toMatchObject({ revision: 2, fields: { body: lines('Intro', 'The regulator is a buck converter.', 'Outro') } });
    expect(details.current.author.handle).toBe('ilse-marrow');
    const conflicts = details.chunks.body.filter((c: { kind: string }) => c.kind === 'conflict');
    expect(conflicts).toEqual([
      expect.objectContaining({
        ours: 'The regulator is an LDO (AMS1117-style).\n',
        theirs: 'The regulator is a buck converter.\n',
        base: 'The regulator is an LDO.\n',
      }),
    ]);
    expect(await revisionNumbers(doc.id)).toEqual([1, 2]);

    // The writer resolves on top of revision 2: accepted as a plain save.
    const resolved = await save(doc.id, { baseRevision: 2, title: 'Clash', body: lines('Intro', 'The regulator is a buck converter (was an LDO).', 'Outro') }).expect(200);
    expect(resolved.body.outcome).toBe('saved');
  });

  it('merges lines such as constructor, __proto__ and toString like any other text', async () => {
    const base = lines('constructor', '__proto__', 'toString', 'hasOwnProperty', 'prototype');
    const doc = await newSection('Prototype Words', base);
    await save(doc.id, { baseRevision: 1, title: 'Prototype Words', body: lines('constructor', 'edited __proto__', 'toString', 'hasOwnProperty', 'prototype') }).expect(200);
    const res = await save(doc.id, { baseRevision: 1, title: 'Prototype Words', body: lines('constructor', '__proto__', 'toString', 'hasOwnProperty', 'prototype edited') }).expect(200);
    expect(res.body.outcome).toBe('merged');
    expect(res.body.document.body).toBe(lines('constructor', 'edited __proto__', 'toString', 'hasOwnProperty', 'prototype edited'));
  });

  it('handles 20 concurrent saves on one base: one lands as is, the rest merge or get 409, numbers stay contiguous', async () => {
    const base = lines(...Array.from({ length: 40 }, (_, i) => `line ${i}`));
    const doc = await newSection('Race', base);
    // Writers 0–9 each edit a line of their own (mergeable); writers 10–19 all edit line 39 (overlap).
    const bodies = Array.from({ length: 20 }, (_, w) => {
      const edited = base.split('\n');
      if (w < 10) edited[w * 3] = `line ${w * 3} by writer ${w}`;
      else edited[39] = `line 39 by writer ${w}`;
      return edited.join('\n');
    });
    const results = await Promise.all(bodies.map((body) => save(doc.id, { baseRevision: 1, title: 'Race', body })));
    const outcomes = results.map((r) => (r.status === 200 ? r.body.outcome : r.status));
    expect(outcomes.filter((o) => o === 'saved')).toHaveLength(1);
    expect(outcomes.every((o) => o === 'saved' || o === 'merged' || o === 409)).toBe(true);
    const landed = outcomes.filter((o) => o === 'saved' || o === 'merged').length;
    // All ten writers on separate lines land, plus one of the ten on line 39.
    expect(landed).toBe(11);
    // Exactly one of the writers on line 39 can land; the others overlap with it.
    expect(outcomes.filter((o, w) => w >= 10 && o !== 409)).toHaveLength(1);
    const numbers = await revisionNumbers(doc.id);
    expect(numbers).toEqual(Array.from({ length: landed + 1 }, (_, i) => i + 1));
    const final = (await maker.agent.get(`/api/projects/${slug}/documents/${doc.id}`)).body;
    expect(final.revision).toBe(landed + 1);
    // Every writer whose save landed finds their line in the final text.
    results.forEach((r, w) => {
      if (r.status !== 200) return;
      const mine = w < 10 ? `line ${w * 3} by writer ${w}` : `line 39 by writer ${w}`;
      expect(final.body, `writer ${w}`).toContain(mine);
    });
  });
});

describe('history and restore', () => {
  it('lists revisions newest first, shows any one, and restores by appending', async () => {
    const doc = await newSection('History', 'v1\n');
    await save(doc.id, { baseRevision: 1, title: 'History', body: 'v2\n', message: 'second' }).expect(200);
    await save(doc.id, { baseRevision: 2, title: 'History renamed', body: 'v3\n', message: 'third' }).expect(200);
    const list = (await maker.agent.get(`/api/projects/${slug}/documents/${doc.id}/revisions`).expect(200)).body.items;
    expect(list.map((r: { number: number; message: string }) => [r.number, r.message])).toEqual([
      [3, 'third'],
      [2, 'second'],
      [1, 'Added the section “History”'],
    ]);
    const r1 = (await maker.agent.get(`/api/projects/${slug}/documents/${doc.id}/revisions/1`).expect(200)).body;
    expect(r1).toMatchObject({ number: 1, title: 'History', body: 'v1\n' });

    const restored = await maker.agent
      .post(`/api/projects/${slug}/documents/${doc.id}/restore`)
      .set(maker.headers)
      .send({ number: 1, baseRevision: 3 })
      .expect(200);
    expect(restored.body.document).toMatchObject({ revision: 4, title: 'History', body: 'v1\n' });
    const after = (await maker.agent.get(`/api/projects/${slug}/documents/${doc.id}/revisions`)).body.items;
    expect(after[0]).toMatchObject({ number: 4, origin: 'restore', message: 'Restored revision 1' });
    expect(after[0].contentHash).toBe(after[3].contentHash);
    const stillOld = (await maker.agent.get(`/api/projects/${slug}/documents/${doc.id}/revisions/3`)).body;
    expect(stillOld).toMatchObject({ title: 'History renamed', body: 'v3\n' });
  });

  it('keeps revisions immutable at the database', async () => {
    const doc = await newSection('Immutable', 'v1\n');
    await expect(
      t.ctx.db.execute(sql`UPDATE revisions SET body = 'forged' WHERE subject = 'document' AND subject_id = ${doc.id}`),
    ).rejects.toMatchObject({ cause: { message: expect.stringMatching(/immutable/) } });
  });
});

describe('log entries and sections on the project page', () => {
  it('lists log entries newest first and needs a date for each', async () => {
    await maker.agent.post(`/api/projects/${slug}/log`).set(maker.headers).send({ title: 'Boards arrived', loggedOn: '2026-03-20', body: 'Five boards.' }).expect(201);
    await maker.agent.post(`/api/projects/${slug}/log`).set(maker.headers).send({ title: 'First power-on', loggedOn: '2026-03-22', body: 'Smoke test passed.' }).expect(201);
    await maker.agent.post(`/api/projects/${slug}/log`).set(maker.headers).send({ title: 'No date' }).expect(400);
    const detail = (await maker.agent.get(`/api/projects/${slug}`)).body;
    expect(detail.logEntries.map((e: { title: string }) => e.title).slice(0, 2)).toEqual(['First power-on', 'Boards arrived']);
  });

  it('reorders sections when given every section once, and refuses anything else', async () => {
    const detail = (await maker.agent.get(`/api/projects/${slug}`)).body;
    const ids: number[] = detail.sections.map((s: { id: number }) => s.id);
    const reversed = [...ids].reverse();
    const res = await maker.agent.put(`/api/projects/${slug}/sections/order`).set(maker.headers).send({ ids: reversed }).expect(200);
    expect(res.body.sections.map((s: { id: number }) => s.id)).toEqual(reversed);
    await maker.agent.put(`/api/projects/${slug}/sections/order`).set(maker.headers).send({ ids: reversed.slice(1) }).expect(400);
    await maker.agent.put(`/api/projects/${slug}/sections/order`).set(maker.headers).send({ ids: [...reversed, reversed[0]] }).expect(400);
  });

  it('removes a section from the page but keeps its history in the database', async () => {
    const doc = await newSection('Temporary', 'gone soon\n');
    await maker.agent.delete(`/api/projects/${slug}/documents/${doc.id}`).set(maker.headers).expect(204);
    const detail = (await maker.agent.get(`/api/projects/${slug}`)).body;
    expect(detail.sections.map((s: { id: number }) => s.id)).not.toContain(doc.id);
    expect((await maker.agent.get(`/api/projects/${slug}/documents/${doc.id}`)).status).toBe(404);
    expect(await revisionNumbers(doc.id)).toEqual([1]);
  });

  it('serves rendered HTML with prefixed heading ids and a table of contents, never raw HTML', async () => {
    const doc = await newSection('Rendered', '## Power\n\nText <script>alert(1)</script>\n\n### Regulator\n');
    const detail = (await maker.agent.get(`/api/projects/${slug}/documents/${doc.id}`)).body;
    expect(detail.html).toContain(`<h2 id="d${doc.id}-power">Power</h2>`);
    expect(detail.html).not.toContain('<script');
    expect(detail.toc).toEqual([
      { level: 2, id: `d${doc.id}-power`, text: 'Power' },
      { level: 3, id: `d${doc.id}-regulator`, text: 'Regulator' },
    ]);
  });

  it('refuses text that is too long or cannot be stored', async () => {
    const doc = await newSection('Limits', 'ok\n');
    await save(doc.id, { baseRevision: 1, title: 'Limits', body: 'x'.repeat(200_001) }).expect(400);
    await save(doc.id, { baseRevision: 1, title: 'Limits', body: 'nul \u0000 here' }).expect(400);
    expect(await revisionNumbers(doc.id)).toEqual([1]);
  });
});
