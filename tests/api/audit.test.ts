/**
 * The audit log routes: searchable by moderators and admins, newest first and paginated; one
 * item's moderation history for moderators, the item's author and its project's owner (without
 * the moderators' names); and nothing — no route, no SQL — changes or removes an entry.
 */
import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { appendAudit } from '../../api/audit/queries';
import { createTestApp, type SignedInAgent, type TestApp } from '../setup/app';

let t: TestApp;
let owner: SignedInAgent;
let member: SignedInAgent;
let editor: SignedInAgent;
let moderator: SignedInAgent;
let admin: SignedInAgent;
let slug: string;
let lessonId: number;

beforeAll(async () => {
  t = await createTestApp();
  owner = await t.signIn('ilse-marrow');
  member = await t.signIn('bram-tolliver');
  editor = await t.signIn('juniper-okoye');
  moderator = await t.signIn('odile-fenwick');
  admin = await t.signIn('quill-haverford');
  const p = await owner.agent
    .post('/api/projects')
    .set(owner.headers)
    .send({ title: 'Beehive Scale', summary: '', licence: 'MIT', hazards: [] })
    .expect(201);
  slug = p.body.slug;
  lessonId = (
    await owner.agent
      .post(`/api/projects/${slug}/lessons`)
      .set(owner.headers)
      .send({ body: 'Load cells creep: calibrate warm.' })
      .expect(201)
  ).body.id;
  await owner.agent.post(`/api/projects/${slug}/publish`).set(owner.headers).expect(200);
  await moderator.agent
    .post(`/api/moderation/targets/lesson/${lessonId}/hide`)
    .set(moderator.headers)
    .send({ reason: 'Under review' })
    .expect(200);
  await moderator.agent
    .post(`/api/moderation/targets/lesson/${lessonId}/restore`)
    .set(moderator.headers)
    .send({ reason: 'Checked: fine' })
    .expect(200);
});
afterAll(async () => {
  await t.close();
});

describe('GET /api/audit', () => {
  it('lists entries newest first with the actor, and filters by action, actor, target and text', async () => {
    const all = await moderator.agent.get('/api/audit').expect(200);
    const times = all.body.items.map((e: { at: string }) => Date.parse(e.at));
    expect(times).toEqual([...times].sort((a, b) => b - a));
    const byAction = await moderator.agent.get('/api/audit?action=content.hide').expect(200);
    expect(byAction.body.items).toHaveLength(1);
    expect(byAction.body.items[0]).toMatchObject({
      actor: { handle: 'odile-fenwick' },
      targetKind: 'lesson',
      targetId: String(lessonId),
      reason: 'Under review',
    });
    const byTarget = await admin.agent.get(`/api/audit?targetKind=lesson&targetId=${lessonId}`).expect(200);
    expect(byTarget.body.items.map((e: { action: string }) => e.action)).toEqual(['content.restore', 'content.hide']);
    expect(
      (await admin.agent.get('/api/audit?q=checked').expect(200)).body.items.map((e: { action: string }) => e.action),
    ).toEqual(['content.restore']);
    expect(
      (await admin.agent.get('/api/audit?actor=quill-haverford&action=content.hide').expect(200)).body.items,
    ).toEqual([]);
  });

  it('pages 50 entries at a time', async () => {
    for (let i = 0; i < 55; i++) {
      await appendAudit(t.ctx.db, { actorId: null, action: 'test.filler', targetKind: 'test', targetId: i });
    }
    const first = await moderator.agent.get('/api/audit?action=test.filler').expect(200);
    expect(first.body).toMatchObject({ total: 55, page: 1, pageSize: 50 });
    expect(first.body.items).toHaveLength(50);
    expect(first.body.items[0].targetId).toBe('54');
    const second = await moderator.agent.get('/api/audit?action=test.filler&page=2').expect(200);
    expect(second.body.items.map((e: { targetId: string }) => e.targetId)).toEqual(['4', '3', '2', '1', '0']);
  });

  it('refuses anonymous callers (401) and members, editors and owners (403)', async () => {
    expect((await t.agent().get('/api/audit')).status).toBe(401);
    for (const who of [member, editor, owner]) expect((await who.agent.get('/api/audit')).status).toBe(403);
  });
});

describe('GET /api/audit/for/:targetKind/:targetId', () => {
  const path = () => `/api/audit/for/lesson/${lessonId}`;

  it('gives moderators the history with the moderators’ names', async () => {
    const res = await moderator.agent.get(path()).expect(200);
    expect(
      res.body.items.map((e: { action: string; actor: { handle: string } }) => [e.action, e.actor.handle]),
    ).toEqual([
      ['content.restore', 'odile-fenwick'],
      ['content.hide', 'odile-fenwick'],
    ]);
  });

  it('gives the project’s owner the history without the moderators’ names', async () => {
    const res = await owner.agent.get(path()).expect(200);
    expect(res.body.items.map((e: { action: string }) => e.action)).toEqual(['content.restore', 'content.hide']);
    expect(res.body.items.every((e: { actor: unknown }) => e.actor === null)).toBe(true);
  });

  it('refuses other members (403), anonymous callers (401), and answers 404 for unknown content', async () => {
    expect((await member.agent.get(path())).status).toBe(403);
    expect((await t.agent().get(path())).status).toBe(401);
    expect((await moderator.agent.get('/api/audit/for/lesson/999999')).status).toBe(404);
    expect((await owner.agent.get('/api/audit/for/lesson/999999')).status).toBe(404);
  });
});

describe('the log is append-only', () => {
  it('has no route that changes or removes an entry', async () => {
    const [entry] = (await admin.agent.get('/api/audit?action=content.hide').expect(200)).body.items;
    for (const method of ['put', 'patch', 'delete'] as const) {
      for (const url of ['/api/audit', `/api/audit/${entry.id}`, `/api/audit/for/lesson/${lessonId}`]) {
        const res = await admin.agent[method](url).set(admin.headers).send({ reason: 'rewritten' });
        expect([404, 405], `${method.toUpperCase()} ${url}`).toContain(res.status);
      }
    }
    const again = (await admin.agent.get('/api/audit?action=content.hide').expect(200)).body.items[0];
    expect(again).toEqual(entry);
    const writes = t.routes.table.filter((r) => r.path.startsWith('/audit') && r.method !== 'get');
    expect(writes).toEqual([]);
  });

  it('refuses SQL UPDATE and DELETE on entries', async () => {
    await expect(
      t.ctx.db.execute(sql`UPDATE audit_log SET reason = 'rewritten' WHERE action = 'content.hide'`),
    ).rejects.toThrow();
    await expect(t.ctx.db.execute(sql`DELETE FROM audit_log WHERE action = 'content.hide'`)).rejects.toThrow();
    const rows = await t.ctx.db.execute<{ reason: string }>(
      sql`SELECT reason FROM audit_log WHERE action = 'content.hide'`,
    );
    expect(rows.rows).toEqual([{ reason: 'Under review' }]);
  });
});
