import { sql } from 'drizzle-orm';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, type TestApp } from '../setup/app';

let t: TestApp;
beforeAll(async () => {
  t = await createTestApp();
});
afterAll(async () => {
  await t.close();
});

const cookieOf = (res: request.Response) =>
  ([] as string[]).concat(res.headers['set-cookie'] ?? []).find((c) => c.startsWith('rwb.sid='))?.split(';')[0];

/** Start the flow and get the provider's redirect back (code + state) without following it. */
async function providerRedirect(agent: ReturnType<TestApp['agent']>, login: string, query = '') {
  const start = await agent.get(`/api/auth/github${query}`).expect(302);
  const authorize = new URL(start.headers.location as string);
  authorize.searchParams.set('login', login);
  const granted = await fetch(authorize, { redirect: 'manual' });
  return new URL(granted.headers.get('location')!);
}

describe('the OAuth callback', () => {
  it('refuses a callback without state and signs nobody in', async () => {
    const agent = t.agent();
    const back = await providerRedirect(agent, 'bram-tolliver');
    back.searchParams.delete('state');
    const res = await agent.get(back.pathname + back.search).expect(303);
    expect(res.headers.location).toBe('/sign-in?failed=state');
    expect((await agent.get('/api/me')).body.user).toBeNull();
  });

  it('refuses a callback with a wrong state', async () => {
    const agent = t.agent();
    const back = await providerRedirect(agent, 'bram-tolliver');
    back.searchParams.set('state', 'forged-state-value');
    const res = await agent.get(back.pathname + back.search).expect(303);
    expect(res.headers.location).toBe('/sign-in?failed=state');
    expect((await agent.get('/api/me')).body.user).toBeNull();
  });

  it('refuses a code replayed from another browser (state lives in the first browser session)', async () => {
    const victim = t.agent();
    const back = await providerRedirect(victim, 'bram-tolliver');
    const attacker = t.agent();
    const res = await attacker.get(back.pathname + back.search).expect(303);
    expect(res.headers.location).toBe('/sign-in?failed=state');
    expect((await attacker.get('/api/me')).body.user).toBeNull();
  });

  it('returns to an app-relative path after sign-in, and never to another site', async () => {
    for (const [returnTo, expected] of [
      ['/admin/users', '/admin/users'],
      ['https://attacker.example/phish', '/'],
      ['//attacker.example', '/'],
      ['/\\attacker.example', '/'],
      ['javascript:alert(1)', '/'],
    ] as const) {
      const agent = t.agent();
      const back = await providerRedirect(agent, 'juniper-okoye', `?returnTo=${encodeURIComponent(returnTo)}`);
      const res = await agent.get(back.pathname + back.search).expect(303);
      expect(res.headers.location, `returnTo=${returnTo}`).toBe(expected);
    }
  });
});

describe('sign-out', () => {
  it('destroys the session on the server: the old cookie is unusable afterwards', async () => {
    const member = await t.signIn('bram-tolliver');
    const me = await member.agent.get('/api/me');
    expect(me.body.user.handle).toBe('bram-tolliver');
    const captured = member.cookie;

    await member.agent.post('/api/auth/signout').set(member.headers).expect(204);

    const replay = await request(t.app).get('/api/me').set('Cookie', captured).expect(200);
    expect(replay.body.user).toBeNull();
    const write = await request(t.app)
      .patch('/api/me')
      .set('Cookie', captured)
      .set(member.headers)
      .send({ displayName: 'After sign-out' });
    expect(write.status).toBe(401);
  });

  it('is a POST: GET does not sign out', async () => {
    const member = await t.signIn('bram-tolliver');
    await member.agent.get('/api/auth/signout').expect(404);
    expect((await member.agent.get('/api/me')).body.user.handle).toBe('bram-tolliver');
  });
});

describe('session lifetimes and cookie flags', () => {
  it('ends a session older than the absolute lifetime however active it is', async () => {
    const member = await t.signIn('juniper-okoye');
    // Age the session on the server by moving its sign-in time back beyond the limit.
    const limitMs = t.config.SESSION_ABSOLUTE_HOURS * 3_600_000;
    await t.ctx.db.execute(sql`
      UPDATE session SET sess = jsonb_set(sess::jsonb, '{signedInAt}', to_jsonb(${Date.now() - limitMs - 1000}::bigint))::json
      WHERE sess->'passport'->>'user' = ${String(member.userId)}`);
    expect((await member.agent.get('/api/me')).body.user).toBeNull();
  });

  it('marks the cookie Secure in production behind TLS', async () => {
    const prod = await createTestApp({
      env: {
        NODE_ENV: 'production',
        SESSION_SECRET: 'a-production-secret-of-at-least-32-characters',
        APP_ORIGIN: 'https://reworkbook.example',
        TRUST_PROXY: 'true',
      },
      database: t.database,
      seed: false,
    });
    const res = await request(prod.app).get('/api/auth/github').set('X-Forwarded-Proto', 'https').expect(302);
    const cookie = ([] as string[]).concat(res.headers['set-cookie'] ?? []).find((c) => c.startsWith('rwb.sid='))!;
    expect(cookie).toMatch(/;\s*Secure/i);
    expect(cookie).toMatch(/HttpOnly/i);
    expect(res.headers['strict-transport-security']).toContain('max-age=');
    await prod.close();
  });

  it('keeps the pre-sign-in session and the signed-in session distinct', async () => {
    const agent = t.agent();
    const start = await agent.get('/api/auth/github').expect(302);
    const before = cookieOf(start);
    const authorize = new URL(start.headers.location as string);
    authorize.searchParams.set('login', 'odile-fenwick');
    const granted = await fetch(authorize, { redirect: 'manual' });
    const back = new URL(granted.headers.get('location')!);
    await agent.get(back.pathname + back.search).expect(303);
    const stale = await request(t.app).get('/api/me').set('Cookie', before!).expect(200);
    expect(stale.body.user).toBeNull();
  });
});

describe('sign-in rate limit', () => {
  it('answers 429 with Retry-After once the budget per minute is spent', async () => {
    // Its own database: the budget is counted in PostgreSQL, shared with every app on it.
    const limited = await createTestApp({ env: { SIGN_IN_RATE_PER_MINUTE: '3' }, seed: false });
    const statuses: number[] = [];
    for (let i = 0; i < 5; i++) statuses.push((await limited.agent().get('/api/auth/github')).status);
    expect(statuses.slice(0, 3)).toEqual([302, 302, 302]);
    expect(statuses.slice(3)).toEqual([429, 429]);
    const res = await limited.agent().get('/api/auth/github').expect(429);
    expect(Number(res.headers['retry-after'])).toBeGreaterThan(0);
    expect(res.body.error.code).toBe('rate_limited');
    await limited.close();
  });
});
