/**
 * Per-member budgets on what members write on others' content (api/middleware/rate-limit.ts,
 * `memberBudgets`): a spent budget answers 429 in our error shape with Retry-After, and an
 * account younger than a day has a quarter of the budget, so it hits its limit first.
 */
import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { memberBudgets, newAccountShare } from '../../api/middleware/rate-limit';
import { createTestApp, type SignedInAgent, type TestApp } from '../setup/app';

let t: TestApp;
let owner: SignedInAgent;
let established: SignedInAgent;
let fresh: SignedInAgent;
let projectId: number;
let slug: string;
let erratumNumber: number;
let proposalId: number;

beforeAll(async () => {
  t = await createTestApp();
  owner = await t.signIn('ilse-marrow');
  established = await t.signIn('bram-tolliver');
  fresh = await t.signIn('juniper-okoye');
  // The demo accounts were made when the database was seeded; date them as the test needs.
  await t.ctx.db.execute(sql`UPDATE users SET created_at = now() - interval '30 days' WHERE handle = 'bram-tolliver'`);
  await t.ctx.db.execute(sql`UPDATE users SET created_at = now() - interval '2 hours' WHERE handle = 'juniper-okoye'`);
  const p = await owner.agent
    .post('/api/projects')
    .set(owner.headers)
    .send({ title: 'Hedgehog Feeder Cam', summary: '', licence: 'MIT', hazards: [] })
    .expect(201);
  projectId = p.body.id;
  slug = p.body.slug;
  const revA = (
    await owner.agent
      .post(`/api/projects/${slug}/board-revisions`)
      .set(owner.headers)
      .send({ label: 'Rev A' })
      .expect(201)
  ).body.id;
  const fields = { category: 'power', severity: 'minor', status: 'open', affected: [revA] };
  erratumNumber = (
    await owner.agent
      .post(`/api/projects/${slug}/errata`)
      .set(owner.headers)
      .send({ ...fields, title: 'IR LED too dim' })
      .expect(201)
  ).body.number;
  await owner.agent.post(`/api/projects/${slug}/publish`).set(owner.headers).expect(200);
  proposalId = (
    await established.agent
      .post(`/api/projects/${slug}/proposals`)
      .set(established.headers)
      .send({ kind: 'new_erratum', payload: { ...fields, title: 'PIR triggers on rain' } })
      .expect(201)
  ).body.id;
});
afterAll(async () => {
  await t.close();
});

const flag = (who: SignedInAgent) =>
  who.agent.post('/api/flags').set(who.headers).send({ targetKind: 'project', targetId: projectId, reason: 'spam' });

describe('per-member limits', () => {
  it('gives first-day accounts a quarter of each budget', () => {
    // The published figures of the issue: a quarter of the budget for an account's first day.
    expect(newAccountShare(20)).toBe(5);
    for (const budget of Object.values(memberBudgets)) {
      expect(budget.newAccountPoints).toBe(Math.floor(budget.points / 4));
    }
  });

  it('stops a first-day account after 5 flags in an hour with 429, Retry-After and our error shape', async () => {
    for (let i = 0; i < 5; i++) expect((await flag(fresh)).status).toBeLessThan(300);
    const res = await flag(fresh);
    expect(res.status).toBe(429);
    const retryAfter = Number(res.headers['retry-after']);
    expect(retryAfter).toBeGreaterThan(0);
    expect(retryAfter).toBeLessThanOrEqual(3600);
    expect(res.body).toEqual({
      error: {
        code: 'rate_limited',
        message: `Too many requests. Try again in ${retryAfter} s.`,
        details: { retryAfterSeconds: retryAfter },
      },
    });
  });

  it('lets an established member go on past the first-day limit, up to the full budget of 20', async () => {
    for (let i = 0; i < 20; i++) expect((await flag(established)).status, `flag ${i + 1}`).toBeLessThan(300);
    const res = await flag(established);
    expect(res.status).toBe(429);
    expect(res.body.error.code).toBe('rate_limited');
  });

  it('counts a first-day account’s comments on errata and proposals together: 7 a minute, then 429', async () => {
    for (let i = 0; i < 7; i++) {
      const url =
        i % 2 ? `/api/proposals/${proposalId}/comments` : `/api/projects/${slug}/errata/${erratumNumber}/comments`;
      expect(
        (
          await fresh.agent
            .post(url)
            .set(fresh.headers)
            .send({ body: `Note ${i}` })
        ).status,
        `comment ${i + 1}`,
      ).toBe(201);
    }
    const res = await fresh.agent
      .post(`/api/proposals/${proposalId}/comments`)
      .set(fresh.headers)
      .send({ body: 'One more' });
    expect(res.status).toBe(429);
    expect(res.body.error.code).toBe('rate_limited');
    expect(Number(res.headers['retry-after'])).toBeLessThanOrEqual(60);
    // An established member still comments.
    await established.agent
      .post(`/api/proposals/${proposalId}/comments`)
      .set(established.headers)
      .send({ body: 'Fine here' })
      .expect(201);
  });

  it('lifts the first-day limit once the account is a day old', async () => {
    await t.ctx.db.execute(
      sql`UPDATE users SET created_at = now() - interval '25 hours' WHERE handle = 'juniper-okoye'`,
    );
    expect((await flag(fresh)).status).toBeLessThan(300);
  });
});
