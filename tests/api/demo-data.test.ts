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

  it('marks the mains-powered build with its hazard', async () => {
    const detail = (await t.agent().get('/api/projects/greenhouse-vent-controller')).body;
    expect(detail.hazards).toContain('mains');
  });
});
