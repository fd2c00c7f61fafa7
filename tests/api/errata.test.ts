import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, type SignedInAgent, type TestApp } from '../setup/app';

let t: TestApp;
let maker: SignedInAgent;
let slug: string;
let revA: number;
let revB: number;

beforeAll(async () => {
  t = await createTestApp();
  maker = await t.signIn('ilse-marrow');
  const project = await maker.agent
    .post('/api/projects')
    .set(maker.headers)
    .send({ title: 'Errata Bench', summary: '', licence: 'MIT', hazards: [] })
    .expect(201);
  slug = project.body.slug;
  await maker.agent.post(`/api/projects/${slug}/publish`).set(maker.headers).expect(200);
  revA = (await maker.agent.post(`/api/projects/${slug}/board-revisions`).set(maker.headers).send({ label: 'Rev A' }).expect(201)).body.id;
  revB = (await maker.agent.post(`/api/projects/${slug}/board-revisions`).set(maker.headers).send({ label: 'Rev B' }).expect(201)).body.id;
});
afterAll(async () => {
  await t.close();
});

const erratum = (over: Record<string, unknown> = {}) => ({
  title: 'Relay never switches',
  category: 'pin-capability',
  severity: 'critical',
  status: 'open',
  affected: [revA],
  fixedIn: null,
  refdes: ['U1'],
  parts: ['ATmega328P'],
  pins: ['A6'],
  symptom: 'The relay stays off.\n',
  cause: 'A6 is analog input only.\n',
  workaround: '',
  fix: '',
  ...over,
});

async function create(over: Record<string, unknown> = {}) {
  const res = await maker.agent.post(`/api/projects/${slug}/errata`).set(maker.headers).send(erratum(over));
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body as { number: number; code: string; revision: number; id: number };
}

describe('recording errata', () => {
  it('numbers errata E1, E2 … per project, never reusing a number, even when created at once', async () => {
    const first = await create();
    expect(first.code).toBe(`E${first.number}`);
    const many = await Promise.all(Array.from({ length: 8 }, (_, i) => maker.agent.post(`/api/projects/${slug}/errata`).set(maker.headers).send(erratum({ title: `Parallel ${i}` }))));
    const numbers = many.map((r) => r.body.number as number).sort((a, b) => a - b);
    expect(numbers).toEqual(Array.from({ length: 8 }, (_, i) => first.number + 1 + i));
  });

  it('shows board revisions by label and renders the text fields', async () => {
    const e = await create({ affected: [revA, revB], fixedIn: revB, workaround: '1. Cut the trace\n2. Add a **bodge** wire\n' });
    const detail = (await t.agent().get(`/api/projects/${slug}/errata/${e.code}`).expect(200)).body;
    expect(detail.affected).toEqual([
      { id: revA, label: 'Rev A' },
      { id: revB, label: 'Rev B' },
    ]);
    expect(detail.fixedIn).toEqual({ id: revB, label: 'Rev B' });
    expect(detail.html.workaround).toContain('<strong>bodge</strong>');
    expect(detail.html.workaround).toContain('<ol>');
    expect(detail.viewer).toMatchObject({ canEdit: false, canPropose: false });
  });

  it('refuses board revisions of another project and unknown categories', async () => {
    const other = await maker.agent.post('/api/projects').set(maker.headers).send({ title: 'Other Bench', summary: '', licence: 'MIT', hazards: [] }).expect(201);
    const foreign = (await maker.agent.post(`/api/projects/${other.body.slug}/board-revisions`).set(maker.headers).send({ label: 'Rev X' }).expect(201)).body.id;
    const before = (await t.agent().get(`/api/projects/${slug}/errata`)).body.items.length;
    const bad1 = await maker.agent.post(`/api/projects/${slug}/errata`).set(maker.headers).send(erratum({ affected: [foreign] })).expect(400);
    expect(bad1.body.error.details.issues).toEqual([{ path: 'affected', message: 'not a board revision of this project' }]);
    await maker.agent.post(`/api/projects/${slug}/errata`).set(maker.headers).send(erratum({ category: 'no-such-category' })).expect(400);
    await maker.agent.post(`/api/projects/${slug}/errata`).set(maker.headers).send(erratum({ severity: 'apocalyptic' })).expect(400);
    expect((await t.agent().get(`/api/projects/${slug}/errata`)).body.items.length).toBe(before);
  });

  it('will not remove a board revision that errata name', async () => {
    const res = await maker.agent.delete(`/api/projects/${slug}/board-revisions/${revA}`).set(maker.headers).expect(409);
    expect(res.body.error.message).toMatch(/E\d+/);
  });
});

describe('erratum revisions', () => {
  it('keeps a field-by-field history, merges changes to different fields, and refuses overlaps', async () => {
    const e = await create();
    const base = { ...erratum(), baseRevision: 1 };
    const one = await maker.agent.put(`/api/projects/${slug}/errata/${e.code}`).set(maker.headers).send({ ...base, status: 'workaround', workaround: 'Bodge D7 to the relay input.\n' }).expect(200);
    expect(one.body.outcome).toBe('saved');
    // A second writer on revision 1 changes the cause: merged.
    const two = await maker.agent.put(`/api/projects/${slug}/errata/${e.code}`).set(maker.headers).send({ ...base, cause: 'A6 is analog input only (ADC6, no port).\n' }).expect(200);
    expect(two.body.outcome).toBe('merged');
    expect(two.body.erratum).toMatchObject({ status: 'workaround', cause: 'A6 is analog input only (ADC6, no port).\n', revision: 3 });
    // A third, still on revision 1, sets another status: both changed the status differently.
    const clash = await maker.agent.put(`/api/projects/${slug}/errata/${e.code}`).set(maker.headers).send({ ...base, status: 'wont_fix' }).expect(409);
    expect(clash.body.error.details.fieldConflicts).toEqual([{ field: 'status', base: 'open', ours: 'wont_fix', theirs: 'workaround' }]);

    const history = (await t.agent().get(`/api/projects/${slug}/errata/${e.code}/revisions`).expect(200)).body.items;
    expect(history.map((r: { number: number; origin: string }) => [r.number, r.origin])).toEqual([
      [3, 'merge'],
      [2, 'edit'],
      [1, 'create'],
    ]);
    const r1 = (await t.agent().get(`/api/projects/${slug}/errata/${e.code}/revisions/1`).expect(200)).body;
    expect(r1.fields).toMatchObject({ status: 'open', affected: [revA], pins: ['A6'] });

    const restored = await maker.agent.post(`/api/projects/${slug}/errata/${e.code}/restore`).set(maker.headers).send({ number: 1, baseRevision: 3 }).expect(200);
    expect(restored.body.erratum).toMatchObject({ status: 'open', revision: 4, cause: 'A6 is analog input only.\n' });
  });

  it('needs a base revision to save', async () => {
    const e = await create();
    await maker.agent.put(`/api/projects/${slug}/errata/${e.code}`).set(maker.headers).send(erratum({ status: 'workaround' })).expect(428);
  });
});

describe('tags on errata and lessons', () => {
  it('reuses approved tags and creates unknown ones as pending, visible on the content at once', async () => {
    const e = await maker.agent.post(`/api/projects/${slug}/errata`).set(maker.headers).send({ ...erratum(), tags: ['Analog-only pin', 'odd relay quirk'] }).expect(201);
    expect(e.body.tags).toEqual(
      expect.arrayContaining([
        { slug: 'analog-only-pin', name: 'Analog-only pin', state: 'approved' },
        { slug: 'odd-relay-quirk', name: 'odd relay quirk', state: 'pending' },
      ]),
    );
    const suggestions = (await maker.agent.get('/api/tags/suggest?q=relay').expect(200)).body.items;
    expect(suggestions.map((s: { slug: string }) => s.slug)).toContain('odd-relay-quirk');
    const strangers = (await t.agent().get('/api/tags/suggest?q=relay').expect(200)).body.items;
    expect(strangers.map((s: { slug: string }) => s.slug)).not.toContain('odd-relay-quirk');
  });

  it('keeps lessons with tags and links to the project errata', async () => {
    const e = await create();
    const lesson = await maker.agent
      .post(`/api/projects/${slug}/lessons`)
      .set(maker.headers)
      .send({ body: 'Check the pin table before routing: **A6** cannot drive anything.', tags: ['analog-only-pin'], errata: [e.number] })
      .expect(201);
    expect(lesson.body.errata).toEqual([{ number: e.number, code: e.code, title: 'Relay never switches' }]);
    expect(lesson.body.html).toContain('<strong>A6</strong>');
    await maker.agent.post(`/api/projects/${slug}/lessons`).set(maker.headers).send({ body: 'x', errata: [9999] }).expect(400);
    const saved = await maker.agent
      .put(`/api/projects/${slug}/lessons/${lesson.body.id}`)
      .set(maker.headers)
      .send({ body: 'Check the pin table first.', tags: ['analog-only-pin', 'documentation'], errata: [], baseRevision: 1 })
      .expect(200);
    expect(saved.body.lesson).toMatchObject({ body: 'Check the pin table first.', errata: [], revision: 2 });
    expect(saved.body.lesson.tags.map((x: { slug: string }) => x.slug).sort()).toEqual(['analog-only-pin', 'documentation']);
    const detail = (await t.agent().get(`/api/projects/${slug}/errata/${e.code}`)).body;
    expect(detail.lessons).toEqual([]);
  });
});

describe('exporting errata', () => {
  it('gives Markdown for the repository, optionally for one board revision', async () => {
    const e = await create({ title: 'Only on Rev B', affected: [revB] });
    const all = await t.agent().get(`/api/projects/${slug}/errata.md`).expect(200);
    expect(all.headers['content-type']).toMatch(/text\/markdown/);
    expect(all.headers['content-disposition']).toBe(`attachment; filename="${slug}-errata.md"`);
    expect(all.text).toContain(`## ${e.code} — Only on Rev B`);
    expect(all.text).toContain('- Severity: Critical');
    const onlyA = await t.agent().get(`/api/projects/${slug}/errata.md?board=${revA}`).expect(200);
    expect(onlyA.text).toContain('# Errata for Rev A');
    expect(onlyA.text).not.toContain('Only on Rev B');
  });
});

describe('discussion on an erratum', () => {
  it('takes comments from signed-in members only and tells the project members', async () => {
    const e = await create();
    const res = await t.agent().post(`/api/projects/${slug}/errata/${e.code}/comments`).set('Origin', t.config.appOrigin).send({ body: 'hi' });
    expect(res.status).toBe(401);
    const bram = await t.signIn('bram-tolliver');
    const posted = await bram.agent.post(`/api/projects/${slug}/errata/${e.code}/comments`).set(bram.headers).send({ body: 'Same on my **Rev A** board.' }).expect(201);
    expect(posted.body.html).toContain('<strong>Rev A</strong>');
    const list = (await t.agent().get(`/api/projects/${slug}/errata/${e.code}/comments`).expect(200)).body;
    expect(list.items.map((c: { author: { handle: string } }) => c.author.handle)).toEqual(['bram-tolliver']);
    const notes = (await maker.agent.get('/api/me/notifications').expect(200)).body;
    expect(notes.items[0]).toMatchObject({ kind: 'comment', read: false, payload: { erratumNumber: e.number, actor: { handle: 'bram-tolliver' } } });
    const rows = await t.ctx.db.execute(sql`SELECT count(*)::int AS n FROM notifications n JOIN users u ON u.id = n.user_id WHERE u.handle = 'bram-tolliver'`);
    expect(rows.rows[0]).toEqual({ n: 0 });
  });
});
