import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, type TestApp } from '../setup/app';

let t: TestApp;
beforeAll(async () => {
  t = await createTestApp();
});
afterAll(async () => {
  await t.close();
});

describe('the demo data', () => {
  it('publishes three write-ups on different boards, with history to show', async () => {
    const list = (await t.agent().get('/api/projects').expect(200)).body.items.map((p: { slug: string }) => p.slug);
    expect(list).toEqual(expect.arrayContaining(['greenhouse-vent-controller', 'bench-supply-monitor', 'tide-clock']));
    for (const slug of ['greenhouse-vent-controller', 'bench-supply-monitor', 'tide-clock']) {
      const detail = (await t.agent().get(`/api/projects/${slug}`).expect(200)).body;
      expect(detail.sections.length, slug).toBeGreaterThanOrEqual(4);
      expect(detail.logEntries.length, slug).toBeGreaterThanOrEqual(4);
      expect(detail.sections.some((s: { revision: number }) => s.revision >= 2), slug).toBe(true);
    }
  });

  it('keeps every document at a revision whose stored hash matches its current text', async () => {
    // The seed computes hashes itself; a mismatch would make the first real save look like a merge.
    const rows = await t.ctx.db.execute<{ id: number; current_revision: number; revisions: number; latest: number }>(sql`
      SELECT d.id, d.current_revision, count(r.id)::int AS revisions, max(r.number) AS latest
      FROM documents d JOIN revisions r ON r.subject = 'document' AND r.subject_id = d.id
      GROUP BY d.id`);
    expect(rows.rows.length).toBeGreaterThan(20);
    for (const row of rows.rows) expect([row.revisions, row.latest]).toEqual([row.current_revision, row.current_revision]);

    const maker = await t.signIn('ilse-marrow');
    const detail = (await t.agent().get('/api/projects/greenhouse-vent-controller')).body;
    const section = detail.sections[0];
    const doc = (await t.agent().get(`/api/projects/greenhouse-vent-controller/documents/${section.id}`)).body;
    const unchanged = await maker.agent
      .put(`/api/projects/greenhouse-vent-controller/documents/${section.id}`)
      .set(maker.headers)
      .send({ baseRevision: doc.revision, title: doc.title, body: doc.body })
      .expect(200);
    expect(unchanged.body.outcome).toBe('unchanged');
  });

  it('has errata across two board revisions, with workarounds, credit and discussion', async () => {
    const list = (await t.agent().get('/api/projects/greenhouse-vent-controller/errata').expect(200)).body;
    expect(list.boards.map((b: { label: string }) => b.label)).toEqual(['Rev A', 'Rev B']);
    expect(list.items.length).toBeGreaterThanOrEqual(4);
    const revA = list.boards[0].id as number;
    const onRevA = list.items.filter((e: { affected: { id: number }[] }) => e.affected.some((a) => a.id === revA));
    expect(onRevA.length).toBeGreaterThanOrEqual(2);
    expect(new Set(list.items.map((e: { severity: string }) => e.severity)).size).toBeGreaterThanOrEqual(3);
    expect(list.items.some((e: { reportedBy: { handle: string } | null }) => e.reportedBy?.handle === 'bram-tolliver')).toBe(true);
    expect(list.items.some((e: { commentCount: number }) => e.commentCount > 0)).toBe(true);
    const history = (await t.agent().get(`/api/projects/greenhouse-vent-controller/errata/${list.items[0].code}/revisions`)).body.items;
    expect(history.length).toBeGreaterThanOrEqual(1);
  });

  it('has open and decided proposals, lessons with tags, and pending tags to curate', async () => {
    const proposals = (await t.agent().get('/api/projects/greenhouse-vent-controller/proposals').expect(200)).body.items;
    const states = new Set(proposals.map((p: { status: string }) => p.status));
    expect(states).toEqual(new Set(['open', 'accepted', 'declined', 'withdrawn']));
    const lessons = (await t.agent().get('/api/projects/greenhouse-vent-controller/lessons').expect(200)).body.items;
    expect(lessons.length).toBeGreaterThanOrEqual(3);
    const pending = await t.ctx.db.execute(sql`SELECT count(*)::int AS n FROM tags WHERE state = 'pending'`);
    expect(pending.rows[0]).toEqual({ n: 2 });
  });

  it('marks the mains-powered build with its hazard', async () => {
    const detail = (await t.agent().get('/api/projects/greenhouse-vent-controller')).body;
    expect(detail.hazards).toContain('mains');
  });
});
