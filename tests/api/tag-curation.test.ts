/**
 * Tag curation by moderators: who may do it, what each action does to the content carrying the
 * tag, that merges survive concurrent tagging, and that every action lands in the audit log.
 */
import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, type SignedInAgent, type TestApp } from '../setup/app';

let t: TestApp;
let owner: SignedInAgent; // ilse-marrow: owns the greenhouse vent controller (and the test project)
let editor: SignedInAgent; // juniper-okoye: editor on the greenhouse vent controller
let member: SignedInAgent; // bram-tolliver: no project role
let moderator: SignedInAgent;
let admin: SignedInAgent;
let slug: string;
let counter = 0;

beforeAll(async () => {
  t = await createTestApp();
  owner = await t.signIn('ilse-marrow');
  editor = await t.signIn('juniper-okoye');
  member = await t.signIn('bram-tolliver');
  moderator = await t.signIn('odile-fenwick');
  admin = await t.signIn('quill-haverford');
  const project = await owner.agent
    .post('/api/projects')
    .set(owner.headers)
    .send({ title: 'Heron Soil Probe', summary: '', licence: 'MIT', hazards: [] })
    .expect(201);
  slug = project.body.slug;
  await owner.agent.post(`/api/projects/${slug}/publish`).set(owner.headers).expect(200);
});
afterAll(async () => {
  await t.close();
});

async function addLesson(tags: string[], body = `Heron lesson ${++counter}: keep the probe leads short.`) {
  const res = await owner.agent.post(`/api/projects/${slug}/lessons`).set(owner.headers).send({ body, tags });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body as { id: number; revision: number };
}

/** A fresh pending tag, created the way members create them: by using it. */
async function pendingTag(name: string): Promise<string> {
  await addLesson([name]);
  const slugOf = name.toLowerCase().replace(/[^a-z0-9]+/g, '-');
  const [row] = (await t.ctx.db.execute<{ state: string }>(sql`SELECT state FROM tags WHERE slug = ${slugOf}`)).rows;
  expect(row?.state).toBe('pending');
  return slugOf;
}

/** Every lesson's and erratum's tag slugs, straight from the link tables. */
async function tagSets() {
  const rows = await t.ctx.db.execute<{ kind: string; id: number; slugs: string[] }>(sql`
    SELECT 'lesson' AS kind, x.lesson_id AS id, array_agg(tg.slug ORDER BY tg.slug) AS slugs
      FROM lesson_tags x JOIN tags tg ON tg.id = x.tag_id GROUP BY x.lesson_id
    UNION ALL
    SELECT 'erratum', x.erratum_id, array_agg(tg.slug ORDER BY tg.slug)
      FROM erratum_tags x JOIN tags tg ON tg.id = x.tag_id GROUP BY x.erratum_id`);
  return Object.fromEntries(rows.rows.map((r) => [`${r.kind}:${r.id}`, r.slugs]));
}

async function usesOfSlug(tagSlug: string): Promise<number> {
  const [row] = (
    await t.ctx.db.execute<{ n: number }>(sql`
      SELECT (SELECT count(*) FROM lesson_tags x JOIN tags g ON g.id = x.tag_id WHERE g.slug = ${tagSlug})
           + (SELECT count(*) FROM erratum_tags x JOIN tags g ON g.id = x.tag_id WHERE g.slug = ${tagSlug}) AS n`)
  ).rows;
  return Number(row!.n);
}

async function lessonTagSlugs(lessonId: number): Promise<string[]> {
  const rows = await t.ctx.db.execute<{ slug: string }>(
    sql`SELECT g.slug FROM lesson_tags x JOIN tags g ON g.id = x.tag_id WHERE x.lesson_id = ${lessonId} ORDER BY g.slug`,
  );
  return rows.rows.map((r) => r.slug);
}

describe('who may curate', () => {
  type Case = {
    name: string;
    method: 'post' | 'patch' | 'get';
    path: (s: string) => string;
    body: Record<string, unknown>;
    /** A tag ready for this action, fresh for each successful caller. */
    prepare: () => Promise<string>;
  };
  const approvedTag = async () => {
    const s = await pendingTag(`Heron approved ${++counter}`);
    await moderator.agent.post(`/api/tags/${s}/approve`).set(moderator.headers).send({}).expect(200);
    return s;
  };
  const cases: Case[] = [
    {
      name: 'approve',
      method: 'post',
      path: (s) => `/api/tags/${s}/approve`,
      body: {},
      prepare: () => pendingTag(`Heron p ${++counter}`),
    },
    {
      name: 'reject',
      method: 'post',
      path: (s) => `/api/tags/${s}/reject`,
      body: { reason: 'Not a tag' },
      prepare: () => pendingTag(`Heron r ${++counter}`),
    },
    {
      name: 'edit',
      method: 'patch',
      path: (s) => `/api/tags/${s}`,
      body: { description: 'Probe wiring.' },
      prepare: approvedTag,
    },
    {
      name: 'merge',
      method: 'post',
      path: (s) => `/api/tags/${s}/merge`,
      body: { into: 'documentation', reason: 'Same idea' },
      prepare: () => pendingTag(`Heron m ${++counter}`),
    },
    {
      name: 'unmerge',
      method: 'post',
      path: (s) => `/api/tags/${s}/unmerge`,
      body: { reason: 'Was different' },
      prepare: async () => {
        const s = await pendingTag(`Heron u ${++counter}`);
        await moderator.agent
          .post(`/api/tags/${s}/merge`)
          .set(moderator.headers)
          .send({ into: 'documentation', reason: 'x' })
          .expect(200);
        return s;
      },
    },
    {
      name: 'deprecate',
      method: 'post',
      path: (s) => `/api/tags/${s}/deprecate`,
      body: { reason: 'Too broad' },
      prepare: approvedTag,
    },
    {
      name: 'undeprecate',
      method: 'post',
      path: (s) => `/api/tags/${s}/undeprecate`,
      body: {},
      prepare: async () => {
        const s = await approvedTag();
        await moderator.agent.post(`/api/tags/${s}/deprecate`).set(moderator.headers).send({ reason: 'x' }).expect(200);
        return s;
      },
    },
    { name: 'history', method: 'get', path: (s) => `/api/tags/${s}/history`, body: {}, prepare: approvedTag },
  ];

  for (const c of cases) {
    it(`${c.name}: anonymous 401, members, editors and owners 403, moderators and admins succeed`, async () => {
      const target = await c.prepare();
      const send = (agent: SignedInAgent | null) => {
        const a = agent ? agent.agent : t.agent();
        const req = a[c.method](c.path(target)).set(agent ? agent.headers : { Origin: t.config.appOrigin });
        return c.method === 'get' ? req : req.send(c.body);
      };
      expect((await send(null)).status).toBe(401);
      for (const who of [member, editor, owner]) {
        const res = await send(who);
        expect(res.status, `${c.name} by a member`).toBe(403);
        expect(res.body.error.code).toBe('forbidden');
      }
      expect((await send(moderator)).status, `${c.name} by the moderator`).toBe(200);
      const second = await c.prepare();
      const a = admin.agent[c.method](c.path(second)).set(admin.headers);
      const res = c.method === 'get' ? await a : await a.send(c.body);
      expect(res.status, `${c.name} by the admin: ${JSON.stringify(res.body)}`).toBe(200);
    });
  }

  it('refuses a curation request without the CSRF token', async () => {
    const s = await pendingTag(`Heron csrf ${++counter}`);
    const res = await moderator.agent
      .post(`/api/tags/${s}/approve`)
      .set({ Origin: t.config.appOrigin })
      .send({})
      .expect(403);
    expect(res.body.error.code).toBe('csrf_failed');
    const [row] = (await t.ctx.db.execute<{ state: string }>(sql`SELECT state FROM tags WHERE slug = ${s}`)).rows;
    expect(row!.state).toBe('pending');
  });
});

describe('merging the demo near-duplicate', () => {
  it('retags in one go, answers the old slug with a redirect, and unmerge puts every tag back', async () => {
    // A lesson carrying both the near-duplicate and the approved tag: after the merge it carries one.
    const both = await addLesson(['adc-only-pin', 'analog-only-pin'], 'Heron: A6 and A7 are ADC only.');
    // Errata too: one with the near-duplicate only, one with both.
    const board = await owner.agent
      .post(`/api/projects/${slug}/board-revisions`)
      .set(owner.headers)
      .send({ label: 'Rev A' })
      .expect(201);
    const erratum = (title: string, tags: string[]) =>
      owner.agent
        .post(`/api/projects/${slug}/errata`)
        .set(owner.headers)
        .send({ title, category: 'pin-capability', severity: 'major', status: 'open', affected: [board.body.id], tags })
        .expect(201);
    const onlyAdc = (await erratum('Heron relay on A7', ['adc-only-pin'])).body as { id: number };
    const bothErratum = (await erratum('Heron LED on A6', ['adc-only-pin', 'analog-only-pin'])).body as { id: number };
    const before = await tagSets();
    const adcUses = await usesOfSlug('adc-only-pin');
    const analogUses = await usesOfSlug('analog-only-pin');
    expect(adcUses).toBeGreaterThanOrEqual(4); // the demo lesson by juniper-okoye, Heron's lesson and errata
    const pageBefore = (await moderator.agent.get('/api/tags/analog-only-pin').expect(200)).body;
    const adcPage = (await moderator.agent.get('/api/tags/adc-only-pin').expect(200)).body;

    const merged = await moderator.agent
      .post('/api/tags/adc-only-pin/merge')
      .set(moderator.headers)
      .send({ into: 'analog-only-pin', reason: 'Same idea: pins that can only be ADC inputs' })
      .expect(200);
    expect(merged.body.mergedInto).toBe('analog-only-pin');
    expect(merged.body.retagged.lessons).toBe(adcUses - 2);

    expect(await usesOfSlug('adc-only-pin')).toBe(0);
    // Each subject carries the tag once: the lesson and the erratum that had both count once.
    expect(await usesOfSlug('analog-only-pin')).toBe(analogUses + adcUses - 2);
    expect(await lessonTagSlugs(both.id)).toEqual(['analog-only-pin']);
    const afterMerge = await tagSets();
    expect(afterMerge[`erratum:${onlyAdc.id}`]).toEqual(['analog-only-pin']);
    expect(afterMerge[`erratum:${bothErratum.id}`]).toEqual(['analog-only-pin']);
    expect(merged.body.retagged.errata).toBe(2);
    const pageAfter = (await moderator.agent.get('/api/tags/analog-only-pin').expect(200)).body;
    expect(pageAfter.tag.counts.lessons).toBe(pageBefore.tag.counts.lessons + adcPage.tag.counts.lessons - 1);
    expect(pageAfter.tag.counts.errata).toBe(pageBefore.tag.counts.errata + 1);
    expect(pageAfter.tag.aliases).toContain('adc-only-pin');
    expect(pageAfter.mergedFrom).toEqual([{ slug: 'adc-only-pin', name: expect.any(String) }]);

    const redirect = (await t.agent().get('/api/tags/adc-only-pin').expect(200)).body;
    expect(redirect).toEqual({ kind: 'redirect', redirectTo: 'analog-only-pin', reason: 'merged' });
    // The index finds the surviving tag by its new alias.
    const found = (await t.agent().get('/api/tags').query({ q: 'adc' }).expect(200)).body.items;
    expect(found.map((i: { slug: string }) => i.slug)).toEqual(['analog-only-pin']);
    // The search index is told about the retagged lesson.
    const queued = await t.ctx.db.execute(
      sql`SELECT 1 FROM search_outbox WHERE kind = 'lesson' AND ref_id = ${both.id}`,
    );
    expect(queued.rows.length).toBeGreaterThan(0);

    await moderator.agent
      .post('/api/tags/adc-only-pin/unmerge')
      .set(moderator.headers)
      .send({ reason: 'Kept apart after all' })
      .expect(200);
    expect(await tagSets()).toEqual(before);
    expect((await moderator.agent.get('/api/tags/adc-only-pin').expect(200)).body.kind).toBe('tag');
    const analogAgain = (await moderator.agent.get('/api/tags/analog-only-pin').expect(200)).body;
    expect(analogAgain.tag.aliases).not.toContain('adc-only-pin');
    expect(analogAgain.tag.counts).toEqual(pageBefore.tag.counts);
  });

  it('puts a lesson back on its tag at unmerge even after the lesson was saved again in between', async () => {
    const s = await pendingTag(`Heron resaved ${++counter}`);
    await moderator.agent.post(`/api/tags/${s}/approve`).set(moderator.headers).send({}).expect(200);
    const lesson = await addLesson([s], 'Heron resaved: the ADC pins cannot drive anything.');
    await moderator.agent
      .post(`/api/tags/${s}/merge`)
      .set(moderator.headers)
      .send({ into: 'analog-only-pin', reason: 'Duplicate' })
      .expect(200);
    expect(await lessonTagSlugs(lesson.id)).toEqual(['analog-only-pin']);
    // The owner edits the lesson's text, keeping its (now merged) tag.
    const saved = await owner.agent
      .put(`/api/projects/${slug}/lessons/${lesson.id}`)
      .set(owner.headers)
      .send({
        body: 'Heron resaved: the ADC pins cannot drive anything, not even an LED.',
        tags: ['analog-only-pin'],
        baseRevision: lesson.revision,
      })
      .expect(200);
    expect(saved.body.outcome).toBeDefined();
    await moderator.agent
      .post(`/api/tags/${s}/unmerge`)
      .set(moderator.headers)
      .send({ reason: 'Kept apart' })
      .expect(200);
    expect(await lessonTagSlugs(lesson.id)).toEqual([s]);
  });

  it('lets a member who types the merged name get the surviving tag', async () => {
    const s = await pendingTag(`Heron typed ${++counter}`);
    await moderator.agent
      .post(`/api/tags/${s}/merge`)
      .set(moderator.headers)
      .send({ into: 'decoupling', reason: 'Same' })
      .expect(200);
    const lesson = await addLesson([s]);
    expect(await lessonTagSlugs(lesson.id)).toEqual(['decoupling']);
  });

  it('keeps nothing on the merged tag while another request tags a lesson with it at the same time', async () => {
    for (let round = 0; round < 5; round++) {
      const from = await pendingTag(`Heron race from ${round}`);
      const into = await pendingTag(`Heron race into ${round}`);
      await moderator.agent.post(`/api/tags/${into}/approve`).set(moderator.headers).send({}).expect(200);
      const target = await addLesson(['bodge-wire'], `Heron race target ${round}.`);
      const [merge, save] = await Promise.all([
        moderator.agent.post(`/api/tags/${from}/merge`).set(moderator.headers).send({ into, reason: 'Race' }),
        owner.agent
          .put(`/api/projects/${slug}/lessons/${target.id}`)
          .set(owner.headers)
          .send({ body: `Heron race target ${round}.`, tags: ['bodge-wire', from], baseRevision: target.revision }),
      ]);
      expect(merge.status, JSON.stringify(merge.body)).toBe(200);
      expect(save.status, JSON.stringify(save.body)).toBe(200);
      expect(await usesOfSlug(from), `round ${round}`).toBe(0);
      expect(await lessonTagSlugs(target.id), `round ${round}`).toEqual(['bodge-wire', into].sort());
    }
  });

  it('refuses merges that make no sense with 409, unknown tags with 404, a missing reason with 400', async () => {
    const s = await pendingTag(`Heron odd ${++counter}`);
    const post = (path: string, body: object) => moderator.agent.post(path).set(moderator.headers).send(body);
    expect((await post(`/api/tags/${s}/merge`, { into: s, reason: 'x' })).status).toBe(409);
    expect((await post(`/api/tags/${s}/merge`, { into: 'silkscreen', reason: 'x' })).status).toBe(409); // pending target
    const m = await pendingTag(`Heron merged ${++counter}`);
    await post(`/api/tags/${m}/merge`, { into: 'esd', reason: 'x' }).expect(200);
    expect((await post(`/api/tags/${s}/merge`, { into: m, reason: 'x' })).status).toBe(409); // merged target
    expect((await post(`/api/tags/${m}/merge`, { into: 'decoupling', reason: 'x' })).status).toBe(409); // already merged
    expect((await post(`/api/tags/${s}/unmerge`, { reason: 'x' })).status).toBe(409); // not merged
    expect((await post(`/api/tags/decoupling/approve`, {})).status).toBe(409); // already approved
    expect((await post(`/api/tags/decoupling/undeprecate`, {})).status).toBe(409);
    expect((await post(`/api/tags/no-such-heron-tag/approve`, {})).status).toBe(404);
    expect((await post(`/api/tags/${s}/merge`, { into: 'no-such-heron-tag', reason: 'x' })).status).toBe(404);
    const noReason = await post(`/api/tags/${s}/merge`, { into: 'decoupling' });
    expect(noReason.status).toBe(400);
    expect(noReason.body.error.code).toBe('validation_failed');
  });
});

describe('rejecting and renaming', () => {
  it('rejecting with a replacement retags the content and keeps the slug as its alias', async () => {
    // The demo tide clock lesson carries "silkscreen" (pending) and "documentation".
    const [carrier] = (
      await t.ctx.db.execute<{ id: number }>(
        sql`SELECT x.lesson_id AS id FROM lesson_tags x JOIN tags g ON g.id = x.tag_id WHERE g.slug = 'silkscreen'`,
      )
    ).rows;
    expect(carrier).toBeDefined();
    const other = await addLesson(['silkscreen']);
    await moderator.agent
      .post('/api/tags/silkscreen/reject')
      .set(moderator.headers)
      .send({ replaceWith: 'documentation', reason: 'Labels are documentation' })
      .expect(200);
    expect(await usesOfSlug('silkscreen')).toBe(0);
    expect(await lessonTagSlugs(carrier!.id)).toEqual(['documentation']);
    expect(await lessonTagSlugs(other.id)).toEqual(['documentation']);
    expect((await t.agent().get('/api/tags/silkscreen').expect(200)).body).toEqual({
      kind: 'redirect',
      redirectTo: 'documentation',
      reason: 'merged',
    });
  });

  it('rejecting without a replacement removes the tag from its content', async () => {
    const s = await pendingTag(`Heron nonsense ${++counter}`);
    const lesson = await addLesson([s, 'decoupling']);
    const res = await moderator.agent
      .post(`/api/tags/${s}/reject`)
      .set(moderator.headers)
      .send({ reason: 'Not a tag' })
      .expect(200);
    expect(res.body.removed).toBe(true);
    expect(await lessonTagSlugs(lesson.id)).toEqual(['decoupling']);
    await moderator.agent.get(`/api/tags/${s}`).expect(404);
    // Only pending tags can be rejected.
    expect(
      (await moderator.agent.post('/api/tags/decoupling/reject').set(moderator.headers).send({ reason: 'x' })).status,
    ).toBe(409);
  });

  it('renaming with a new slug keeps the old slug as an alias that redirects', async () => {
    const s = await pendingTag(`Heron probe wire ${++counter}`);
    await moderator.agent.post(`/api/tags/${s}/approve`).set(moderator.headers).send({}).expect(200);
    const res = await moderator.agent
      .patch(`/api/tags/${s}`)
      .set(moderator.headers)
      .send({ name: 'Probe wiring', slug: 'probe-wiring', description: 'Leads, shielding and strain relief.' })
      .expect(200);
    expect(res.body.tag).toMatchObject({ slug: 'probe-wiring', name: 'Probe wiring', aliases: [s] });
    expect((await t.agent().get(`/api/tags/${s}`).expect(200)).body).toEqual({
      kind: 'redirect',
      redirectTo: 'probe-wiring',
      reason: 'alias',
    });
    // Typing the old name still lands on the tag.
    const lesson = await addLesson([s]);
    expect(await lessonTagSlugs(lesson.id)).toEqual(['probe-wiring']);
    // A slug in use is refused.
    const taken = await moderator.agent
      .patch('/api/tags/probe-wiring')
      .set(moderator.headers)
      .send({ slug: 'decoupling' });
    expect(taken.status).toBe(409);
    await moderator.agent.patch('/api/tags/probe-wiring').set(moderator.headers).send({}).expect(400);
  });
});

describe('the audit trail', () => {
  it('records every action with the tag before and after', async () => {
    const s = await pendingTag(`Heron audited ${++counter}`);
    const post = (verb: string, body: object) =>
      moderator.agent.post(`/api/tags/${s}/${verb}`).set(moderator.headers).send(body).expect(200);
    await post('approve', {});
    await moderator.agent.patch(`/api/tags/${s}`).set(moderator.headers).send({ description: 'Audited.' }).expect(200);
    await post('deprecate', { reason: 'Audit deprecate' });
    await post('undeprecate', {});
    await post('merge', { into: 'decoupling', reason: 'Audit merge' });
    await post('unmerge', { reason: 'Audit unmerge' });
    const [{ id } = { id: 0 }] = (await t.ctx.db.execute<{ id: number }>(sql`SELECT id FROM tags WHERE slug = ${s}`))
      .rows;
    const rows = (
      await t.ctx.db.execute<{
        action: string;
        before: Record<string, unknown>;
        after: Record<string, unknown>;
        reason: string;
        actor: string;
      }>(sql`
        SELECT a.action, a.before, a.after, a.reason, u.handle AS actor FROM audit_log a JOIN users u ON u.id = a.actor_id
        WHERE a.target_kind = 'tag' AND a.target_id = ${String(id)} ORDER BY a.id`)
    ).rows;
    expect(rows.map((r) => r.action)).toEqual([
      'tag.approve',
      'tag.edit',
      'tag.deprecate',
      'tag.undeprecate',
      'tag.merge',
      'tag.unmerge',
    ]);
    expect(rows.every((r) => r.actor === 'odile-fenwick')).toBe(true);
    expect([rows[0]!.before.state, rows[0]!.after.state]).toEqual(['pending', 'approved']);
    expect([rows[1]!.before.description, rows[1]!.after.description]).toEqual(['', 'Audited.']);
    expect([rows[2]!.before.state, rows[2]!.after.state, rows[2]!.reason]).toEqual([
      'approved',
      'deprecated',
      'Audit deprecate',
    ]);
    expect([rows[3]!.before.state, rows[3]!.after.state]).toEqual(['deprecated', 'approved']);
    expect([rows[4]!.before.mergedInto, rows[4]!.after.mergedInto]).toEqual([null, 'decoupling']);
    expect([rows[5]!.before.mergedInto, rows[5]!.after.mergedInto]).toEqual(['decoupling', null]);

    // Rejections are recorded too.
    const r = await pendingTag(`Heron rejected ${++counter}`);
    await moderator.agent
      .post(`/api/tags/${r}/reject`)
      .set(moderator.headers)
      .send({ reason: 'Audit reject' })
      .expect(200);
    const [rejected] = (
      await t.ctx.db.execute<{ before: { slug: string; state: string }; after: unknown }>(
        sql`SELECT before, after FROM audit_log WHERE action = 'tag.reject' AND reason = 'Audit reject'`,
      )
    ).rows;
    expect(rejected).toMatchObject({ before: { slug: r, state: 'pending' }, after: null });

    // The history route shows them newest first.
    const history = (await moderator.agent.get(`/api/tags/${s}/history`).expect(200)).body.items;
    expect(history.map((h: { action: string }) => h.action)).toEqual(rows.map((row) => row.action).reverse());
    expect(history[0].actor).toEqual({ handle: 'odile-fenwick', displayName: 'Odile Fenwick' });
  });

  it('cannot be changed: an UPDATE or DELETE on audit_log fails', async () => {
    const refusal = async (statement: ReturnType<typeof sql>) => {
      try {
        await t.ctx.db.execute(statement);
        return 'accepted';
      } catch (error) {
        // Drizzle wraps the driver's error; the trigger's message is on the cause.
        return String((error as { cause?: { message?: string } }).cause?.message ?? error);
      }
    };
    expect(await refusal(sql`UPDATE audit_log SET reason = 'rewritten' WHERE action LIKE 'tag.%'`)).toMatch(
      /append-only \(UPDATE refused\)/,
    );
    expect(await refusal(sql`DELETE FROM audit_log WHERE action LIKE 'tag.%'`)).toMatch(
      /append-only \(DELETE refused\)/,
    );
    const [left] = (
      await t.ctx.db.execute<{ n: number }>(
        sql`SELECT count(*)::int AS n FROM audit_log WHERE action LIKE 'tag.%' AND reason = 'rewritten'`,
      )
    ).rows;
    expect(left!.n).toBe(0);
  });
});
