/**
 * The moderation routes: who may use them (every role against every route), the queue grouped
 * by target, and hide / restore / dismiss with the flags they close and the audit entries they
 * write (shared/contracts/moderation.ts). ilse-marrow owns the project, juniper-okoye edits it,
 * bram-tolliver is a member who flags, odile-fenwick moderates, quill-haverford is an admin.
 */
import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, type SignedInAgent, type TestApp } from '../setup/app';

type Role = 'anonymous' | 'member' | 'editor' | 'owner' | 'moderator' | 'admin';

let t: TestApp;
const as = {} as Record<Exclude<Role, 'anonymous'>, SignedInAgent>;
let slug: string;
let erratumId: number;
let erratumNumber: number;
let commentId: number;

beforeAll(async () => {
  t = await createTestApp();
  as.member = await t.signIn('bram-tolliver');
  as.editor = await t.signIn('juniper-okoye');
  as.owner = await t.signIn('ilse-marrow');
  as.moderator = await t.signIn('odile-fenwick');
  as.admin = await t.signIn('quill-haverford');
  const p = await as.owner.agent
    .post('/api/projects')
    .set(as.owner.headers)
    .send({ title: 'Kiln Logger', summary: 'Thermocouple logger', licence: 'MIT', hazards: [] })
    .expect(201);
  slug = p.body.slug;
  await as.owner.agent
    .post(`/api/projects/${slug}/editors`)
    .set(as.owner.headers)
    .send({ handle: 'juniper-okoye' })
    .expect(200);
  const revA = (
    await as.owner.agent
      .post(`/api/projects/${slug}/board-revisions`)
      .set(as.owner.headers)
      .send({ label: 'Rev A' })
      .expect(201)
  ).body.id;
  const e = await as.owner.agent
    .post(`/api/projects/${slug}/errata`)
    .set(as.owner.headers)
    .send({
      title: 'Cold junction drifts',
      category: 'power',
      severity: 'minor',
      status: 'open',
      affected: [revA],
      symptom: 'Reads 4 °C high after an hour\n',
    })
    .expect(201);
  erratumId = e.body.id;
  erratumNumber = e.body.number;
  await as.owner.agent.post(`/api/projects/${slug}/publish`).set(as.owner.headers).expect(200);
  const c = await as.member.agent
    .post(`/api/projects/${slug}/errata/${erratumNumber}/comments`)
    .set(as.member.headers)
    .send({ body: 'Buy my miracle thermocouples at a discount' })
    .expect(201);
  commentId = c.body.id;
});

it('finds the demo data’s one open flag in the queue, raised by a member on another’s comment', async () => {
  const res = await as.moderator.agent.get('/api/moderation/flags').expect(200);
  expect(res.body.total).toBe(1);
  const [group] = res.body.items;
  expect(group.target.kind).toBe('comment');
  expect(group.flags).toHaveLength(1);
  expect(group.flags[0].author.handle).toBe('bram-tolliver');
  expect(group.target.author.handle).not.toBe('bram-tolliver');
  expect(group.target.link).not.toBeNull();
  // Set it aside (not through the API, so the audit log holds only this file's actions).
  await t.ctx.db.execute(sql`UPDATE flags SET state = 'dismissed'`);
});
afterAll(async () => {
  await t.close();
});

function agentFor(role: Role) {
  if (role === 'anonymous')
    return { agent: t.agent(), headers: { Origin: t.config.appOrigin } as Record<string, string> };
  return { agent: as[role].agent, headers: as[role].headers };
}

async function auditCount(): Promise<number> {
  const rows = await t.ctx.db.execute<{ n: number }>(sql`SELECT count(*)::int AS n FROM audit_log`);
  return rows.rows[0]!.n;
}

async function hiddenAtOf(table: 'errata' | 'comments', id: number): Promise<string | null> {
  const rows = await t.ctx.db.execute<{ hidden_at: string | null }>(
    sql`SELECT hidden_at FROM ${sql.raw(table)} WHERE id = ${id}`,
  );
  return rows.rows[0]!.hidden_at;
}

describe('who may moderate', () => {
  // Each route with a request that changes nothing when refused; every refusal is checked to change nothing.
  const routes: { name: string; send: (role: Role) => Promise<{ status: number }> }[] = [
    { name: 'GET /moderation/flags', send: (r) => agentFor(r).agent.get('/api/moderation/flags') },
    {
      name: 'GET /moderation/targets/:kind/:id',
      send: (r) => agentFor(r).agent.get(`/api/moderation/targets/erratum/${erratumId}`),
    },
    {
      name: 'POST …/hide',
      send: (r) => {
        const a = agentFor(r);
        return a.agent
          .post(`/api/moderation/targets/comment/${commentId}/hide`)
          .set(a.headers)
          .send({ reason: 'Advertising' });
      },
    },
    {
      name: 'POST …/restore',
      send: (r) => {
        const a = agentFor(r);
        return a.agent.post(`/api/moderation/targets/comment/${commentId}/restore`).set(a.headers).send({});
      },
    },
    {
      name: 'POST /moderation/flags/:id/dismiss',
      send: (r) => {
        const a = agentFor(r);
        return a.agent.post('/api/moderation/flags/1/dismiss').set(a.headers).send({});
      },
    },
    { name: 'GET /audit', send: (r) => agentFor(r).agent.get('/api/audit') },
  ];
  const refused: [Role, number][] = [
    ['anonymous', 401],
    ['member', 403],
    ['editor', 403],
    ['owner', 403],
  ];

  for (const route of routes) {
    for (const [role, status] of refused) {
      it(`${route.name}: ${role} is refused with ${status} and nothing changes`, async () => {
        const before = await auditCount();
        const res = await route.send(role);
        expect(res.status).toBe(status);
        expect(await auditCount()).toBe(before);
        expect(await hiddenAtOf('comments', commentId)).toBeNull();
      });
    }
  }

  for (const role of ['moderator', 'admin'] as const) {
    it(`the queue, a target and the audit log answer 200 to a ${role}`, async () => {
      const a = agentFor(role).agent;
      await a.get('/api/moderation/flags').expect(200);
      await a.get(`/api/moderation/targets/erratum/${erratumId}`).expect(200);
      await a.get('/api/audit').expect(200);
    });

    it(`a ${role} hides and restores content`, async () => {
      const { agent, headers } = agentFor(role);
      await agent
        .post(`/api/moderation/targets/comment/${commentId}/hide`)
        .set(headers)
        .send({ reason: 'Advertising' })
        .expect(200);
      expect(await hiddenAtOf('comments', commentId)).not.toBeNull();
      await agent.post(`/api/moderation/targets/comment/${commentId}/restore`).set(headers).send({}).expect(200);
      expect(await hiddenAtOf('comments', commentId)).toBeNull();
    });
  }

  it('refuses a moderator without the CSRF token (403 csrf_failed) and hides nothing', async () => {
    const res = await as.moderator.agent
      .post(`/api/moderation/targets/comment/${commentId}/hide`)
      .set('Origin', t.config.appOrigin)
      .send({ reason: 'Advertising' });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('csrf_failed');
    expect(await hiddenAtOf('comments', commentId)).toBeNull();
  });
});

describe('the queue and its actions', () => {
  it('groups open flags by target, most flagged first, with the content in context', async () => {
    // Two members flag the comment, one flags the erratum.
    await as.editor.agent
      .post('/api/flags')
      .set(as.editor.headers)
      .send({ targetKind: 'comment', targetId: commentId, reason: 'spam', text: 'An advert' })
      .expect(201);
    await as.owner.agent
      .post('/api/flags')
      .set(as.owner.headers)
      .send({ targetKind: 'comment', targetId: commentId, reason: 'abusive' })
      .expect(201);
    await as.member.agent
      .post('/api/flags')
      .set(as.member.headers)
      .send({ targetKind: 'erratum', targetId: erratumId, reason: 'wrong', text: 'It drifts low, not high' })
      .expect(201);

    const res = await as.moderator.agent.get('/api/moderation/flags?state=open').expect(200);
    expect(res.body.total).toBe(2);
    const [first, second] = res.body.items;
    expect(first.target).toMatchObject({
      kind: 'comment',
      id: commentId,
      title: 'Comment by bram-tolliver',
      excerpt: 'Buy my miracle thermocouples at a discount',
      project: { slug, title: 'Kiln Logger' },
      author: { handle: 'bram-tolliver' },
      link: { name: 'erratum', params: { slug, code: `E${erratumNumber}` }, hash: `comment-${commentId}` },
      hidden: null,
    });
    expect(first.flagCount).toBe(2);
    expect(first.reasons).toEqual(
      expect.arrayContaining([
        { reason: 'spam', count: 1 },
        { reason: 'abusive', count: 1 },
      ]),
    );
    expect(first.flags.map((f: { author: { handle: string } }) => f.author.handle)).toEqual([
      'juniper-okoye',
      'ilse-marrow',
    ]);
    expect(second.target).toMatchObject({
      kind: 'erratum',
      id: erratumId,
      title: `E${erratumNumber} Cold junction drifts`,
    });
    expect(second.target.link).toEqual({ name: 'erratum', params: { slug, code: `E${erratumNumber}` } });
  });

  it('hiding closes the open flags as actioned, records who did it, and a second hide is a 409', async () => {
    const res = await as.moderator.agent
      .post(`/api/moderation/targets/comment/${commentId}/hide`)
      .set(as.moderator.headers)
      .send({ reason: 'Advertising is not allowed in discussions' })
      .expect(200);
    expect(res.body.actionedFlags).toBe(2);
    expect(res.body.target.hidden.reason).toBe('Advertising is not allowed in discussions');

    const open = await as.moderator.agent.get('/api/moderation/flags').expect(200);
    expect(open.body.items.map((g: { target: { kind: string } }) => g.target.kind)).toEqual(['erratum']);
    const actioned = await as.moderator.agent.get('/api/moderation/flags?state=actioned').expect(200);
    const group = actioned.body.items.find((g: { target: { id: number } }) => g.target.id === commentId);
    expect(
      group.flags.every(
        (f: { state: string; handledBy: { handle: string } }) =>
          f.state === 'actioned' && f.handledBy.handle === 'odile-fenwick',
      ),
    ).toBe(true);

    const again = await as.moderator.agent
      .post(`/api/moderation/targets/comment/${commentId}/hide`)
      .set(as.moderator.headers)
      .send({ reason: 'Twice' });
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('conflict');
  });

  it('restoring shows the content again; restoring visible content is a 409', async () => {
    await as.moderator.agent
      .post(`/api/moderation/targets/comment/${commentId}/restore`)
      .set(as.moderator.headers)
      .send({ reason: 'The author removed the link' })
      .expect(200);
    expect(await hiddenAtOf('comments', commentId)).toBeNull();
    const again = await as.moderator.agent
      .post(`/api/moderation/targets/comment/${commentId}/restore`)
      .set(as.moderator.headers)
      .send({});
    expect(again.status).toBe(409);
  });

  it('dismissing a flag leaves the content alone; dismissing it again is a 409', async () => {
    const open = await as.moderator.agent.get('/api/moderation/flags').expect(200);
    const flag = open.body.items[0].flags[0];
    const res = await as.moderator.agent
      .post(`/api/moderation/flags/${flag.id}/dismiss`)
      .set(as.moderator.headers)
      .send({ reason: 'The erratum is right' })
      .expect(200);
    expect(res.body).toMatchObject({ id: flag.id, state: 'dismissed' });
    expect(await hiddenAtOf('errata', erratumId)).toBeNull();
    expect((await as.moderator.agent.get('/api/moderation/flags').expect(200)).body.total).toBe(0);
    const again = await as.moderator.agent
      .post(`/api/moderation/flags/${flag.id}/dismiss`)
      .set(as.moderator.headers)
      .send({});
    expect(again.status).toBe(409);
    await as.moderator.agent
      .post('/api/moderation/flags/999999/dismiss')
      .set(as.moderator.headers)
      .send({})
      .expect(404);
  });

  it('answers 404 for a target that does not exist and 400 for a kind that is not one', async () => {
    await as.moderator.agent
      .post('/api/moderation/targets/erratum/999999/hide')
      .set(as.moderator.headers)
      .send({ reason: 'Nope' })
      .expect(404);
    await as.moderator.agent
      .post('/api/moderation/targets/board/1/hide')
      .set(as.moderator.headers)
      .send({ reason: 'Nope' })
      .expect(400);
  });

  it('writes every action to the audit log with actor, target, before and after', async () => {
    const res = await as.moderator.agent
      .get(`/api/audit?targetKind=comment&targetId=${commentId}&actor=odile-fenwick`)
      .expect(200);
    const actions = res.body.items.map((e: { action: string }) => e.action);
    // Newest first: the restore of the queue test, the hide before it, then the matrix's hide/restore pair.
    expect(actions.slice(0, 2)).toEqual(['content.restore', 'content.hide']);
    const [restore, hide] = res.body.items;
    expect(hide).toMatchObject({
      actor: { handle: 'odile-fenwick' },
      targetKind: 'comment',
      targetId: String(commentId),
      reason: 'Advertising is not allowed in discussions',
      before: { hidden: null },
      after: { hidden: { reason: 'Advertising is not allowed in discussions' }, openFlags: [] },
    });
    expect(hide.before.openFlags).toHaveLength(2);
    expect(restore).toMatchObject({
      before: { hidden: { reason: 'Advertising is not allowed in discussions' } },
      after: { hidden: null },
      reason: 'The author removed the link',
    });
    const dismissals = await as.admin.agent.get('/api/audit?action=flag.dismiss').expect(200);
    expect(dismissals.body.items).toHaveLength(1);
    expect(dismissals.body.items[0]).toMatchObject({
      actor: { handle: 'odile-fenwick' },
      targetKind: 'erratum',
      targetId: String(erratumId),
      before: { flag: { state: 'open' } },
      after: { flag: { state: 'dismissed' } },
      reason: 'The erratum is right',
    });
  });
});
