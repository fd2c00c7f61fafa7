import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, type TestApp } from '../setup/app';

let t: TestApp;
beforeAll(async () => {
  t = await createTestApp();
});
afterAll(async () => {
  await t.close();
});

function sessionCookie(setCookie: string[] | string | undefined): string | undefined {
  const list = Array.isArray(setCookie) ? setCookie : setCookie ? [setCookie] : [];
  return list.find((c) => c.startsWith('rwb.sid='));
}

describe('sign-in through the OAuth flow', () => {
  it('signs a demo member in and shows them in /api/me', async () => {
    const { agent } = await t.signIn('ilse-marrow');
    const me = await agent.get('/api/me').expect(200);
    expect(me.body.user).toMatchObject({ handle: 'ilse-marrow', displayName: 'Ilse Marrow', role: 'member' });
    expect(me.body.csrfToken).toMatch(/^[A-Za-z0-9_-]{40,}$/);
  });

  it('sends state and a PKCE challenge to the provider', async () => {
    const start = await t.agent().get('/api/auth/github').expect(302);
    const url = new URL(start.headers.location as string);
    expect(url.searchParams.get('state')).toMatch(/.{16,}/);
    expect(url.searchParams.get('code_challenge_method')).toBe('S256');
    expect(url.searchParams.get('code_challenge')).toMatch(/^[A-Za-z0-9_-]{43}$/);
  });

  it('issues a new session id at sign-in (no session fixation)', async () => {
    const agent = t.agent();
    const start = await agent.get('/api/auth/github').expect(302);
    const before = sessionCookie(start.headers['set-cookie'])?.split(';')[0];
    expect(before, 'the flow keeps its state in a pre-sign-in session').toBeDefined();
    const authorize = new URL(start.headers.location as string);
    authorize.searchParams.set('login', 'bram-tolliver');
    const granted = await fetch(authorize, { redirect: 'manual' });
    const callback = new URL(granted.headers.get('location')!);
    const done = await agent.get(callback.pathname + callback.search).expect(303);
    const after = sessionCookie(done.headers['set-cookie'])?.split(';')[0];
    expect(after).toBeDefined();
    expect(after).not.toBe(before);
  });

  it('sets the cookie HttpOnly and SameSite=Lax, under our own name', async () => {
    const start = await t.agent().get('/api/auth/github').expect(302);
    const cookie = sessionCookie(start.headers['set-cookie'])!;
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    expect(JSON.stringify(start.headers['set-cookie'])).not.toContain('connect.sid');
  });
});
