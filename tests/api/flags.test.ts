/**
 * Flagging (POST /api/flags): any signed-in member flags what they can read, once per target
 * while their flag is open; their own content, content they cannot see and unknown targets are
 * refused (shared/contracts/moderation.ts).
 */
import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, type SignedInAgent, type TestApp } from '../setup/app';

let t: TestApp;
let owner: SignedInAgent;
let member: SignedInAgent;
let other: SignedInAgent;
let moderator: SignedInAgent;
let slug: string;
let draftProjectId: number;
let projectId: number;
let lessonId: number;

async function flagsOn(kind: string, id: number): Promise<{ author_id: number; state: string; reason: string }[]> {
  const rows = await t.ctx.db.execute<{ author_id: number; state: string; reason: string }>(
    sql`SELECT author_id, state, reason FROM flags WHERE target_kind = ${kind} AND target_id = ${id} ORDER BY id`,
  );
  return rows.rows;
}

beforeAll(async () => {
  t = await createTestApp();
  owner = await t.signIn('ilse-marrow');
  member = await t.signIn('bram-tolliver');
  other = await t.signIn('juniper-okoye');
  moderator = await t.signIn('odile-fenwick');
  const p = await owner.agent
    .post('/api/projects')
    .set(owner.headers)
    .send({ title: 'Pond Aerator', summary: 'Solar pump timer', licence: 'MIT', hazards: [] })
    .expect(201);
  slug = p.body.slug;
  projectId = p.body.id;
  lessonId = (
    await owner.agent
      .post(`/api/projects/${slug}/lessons`)
      .set(owner.headers)
      .send({ body: 'Pot the timer board; condensation finds every gap.' })
      .expect(201)
  ).body.id;
  await owner.agent.post(`/api/projects/${slug}/publish`).set(owner.headers).expect(200);
  const d = await owner.agent
    .post('/api/projects')
    .set(owner.headers)
    .send({ title: 'Pond Aerator Two', summary: '', licence: 'MIT', hazards: [] })
    .expect(201);
  draftProjectId = d.body.id;
  // The demo data's open flag is set aside so the queue holds only this file's flags.
  await t.ctx.db.execute(sql`UPDATE flags SET state = 'dismissed'`);
});
afterAll(async () => {
  await t.close();
});

describe('POST /api/flags', () => {
  it('stores a member’s flag with its reason and text and answers 201', async () => {
    const res = await member.agent
      .post('/api/flags')
      .set(member.headers)
      .send({
        targetKind: 'lesson',
        targetId: lessonId,
        reason: 'unsafe',
        text: 'Potting compound near mains needs a rating',
      })
      .expect(201);
    expect(res.body.repeated).toBe(false);
    expect(res.body.flag).toMatchObject({
      targetKind: 'lesson',
      targetId: lessonId,
      reason: 'unsafe',
      state: 'open',
      handledAt: null,
    });
    expect(await flagsOn('lesson', lessonId)).toEqual([{ author_id: member.userId, state: 'open', reason: 'unsafe' }]);
  });

  it('counts a member’s repeated flags on one target once: 200 with the first flag', async () => {
    const first = (await flagsOn('lesson', lessonId)).length;
    const res = await member.agent
      .post('/api/flags')
      .set(member.headers)
      .send({ targetKind: 'lesson', targetId: lessonId, reason: 'spam', text: 'again' })
      .expect(200);
    expect(res.body.repeated).toBe(true);
    expect(res.body.flag.reason).toBe('unsafe');
    expect(await flagsOn('lesson', lessonId)).toHaveLength(first);
  });

  it('counts another member’s flag on the same target separately', async () => {
    await other.agent
      .post('/api/flags')
      .set(other.headers)
      .send({ targetKind: 'lesson', targetId: lessonId, reason: 'wrong' })
      .expect(201);
    expect(await flagsOn('lesson', lessonId)).toHaveLength(2);
  });

  it('takes a new flag from the same member once their earlier one was handled', async () => {
    const open = await moderator.agent.get('/api/moderation/flags').expect(200);
    const mine = open.body.items[0].flags.find(
      (f: { author: { handle: string } }) => f.author.handle === 'bram-tolliver',
    );
    await moderator.agent.post(`/api/moderation/flags/${mine.id}/dismiss`).set(moderator.headers).send({}).expect(200);
    await member.agent
      .post('/api/flags')
      .set(member.headers)
      .send({ targetKind: 'lesson', targetId: lessonId, reason: 'unsafe', text: 'Still unsafe' })
      .expect(201);
    expect((await flagsOn('lesson', lessonId)).map((f) => f.state)).toEqual(['dismissed', 'open', 'open']);
  });

  it('refuses flagging your own content with 403', async () => {
    const res = await owner.agent
      .post('/api/flags')
      .set(owner.headers)
      .send({ targetKind: 'project', targetId: projectId, reason: 'wrong' });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('forbidden');
    expect(await flagsOn('project', projectId)).toHaveLength(0);
  });

  it('answers 404 for a target that does not exist and for a draft the member cannot read', async () => {
    const missing = await member.agent
      .post('/api/flags')
      .set(member.headers)
      .send({ targetKind: 'comment', targetId: 987654, reason: 'spam' });
    expect(missing.status).toBe(404);
    const draft = await member.agent
      .post('/api/flags')
      .set(member.headers)
      .send({ targetKind: 'project', targetId: draftProjectId, reason: 'spam' });
    expect(draft.status).toBe(404);
    expect(await flagsOn('project', draftProjectId)).toHaveLength(0);
  });

  it('refuses anonymous callers (401), a missing CSRF token (403) and a reason outside the list (400)', async () => {
    const body = { targetKind: 'project', targetId: projectId, reason: 'wrong' };
    expect((await t.agent().post('/api/flags').set('Origin', t.config.appOrigin).send(body)).status).toBe(401);
    const csrf = await member.agent.post('/api/flags').set('Origin', t.config.appOrigin).send(body);
    expect(csrf.status).toBe(403);
    expect(csrf.body.error.code).toBe('csrf_failed');
    const bad = await member.agent
      .post('/api/flags')
      .set(member.headers)
      .send({ ...body, reason: 'boring' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.code).toBe('validation_failed');
    expect(await flagsOn('project', projectId)).toHaveLength(0);
  });

  it('asks for details when the reason is "other"', async () => {
    const res = await member.agent
      .post('/api/flags')
      .set(member.headers)
      .send({ targetKind: 'project', targetId: projectId, reason: 'other', text: '  ' });
    expect(res.status).toBe(400);
    expect(res.body.error.details.issues[0].path).toBe('text');
  });
});
