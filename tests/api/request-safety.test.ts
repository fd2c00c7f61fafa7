import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, type SignedInAgent, type TestApp } from '../setup/app';

let t: TestApp;
let maker: SignedInAgent;

beforeAll(async () => {
  t = await createTestApp();
  maker = await t.signIn('ilse-marrow');
});
afterAll(async () => {
  await t.close();
});

async function displayNameOf(handle: string): Promise<string> {
  const result = await t.ctx.db.execute<{ display_name: string }>(
    sql`SELECT display_name FROM users WHERE handle = ${handle}`,
  );
  return result.rows[0]!.display_name;
}

describe('CSRF protection on unsafe methods', () => {
  it('refuses a POST without the token and changes nothing', async () => {
    const res = await maker.agent
      .patch('/api/me')
      .set('Origin', t.config.appOrigin)
      .send({ displayName: 'Changed without token' })
      .expect(403);
    expect(res.body.error.code).toBe('csrf_failed');
    expect(await displayNameOf('ilse-marrow')).toBe('Ilse Marrow');
  });

  it('refuses a request from a foreign Origin even with the right token', async () => {
    const res = await maker.agent
      .patch('/api/me')
      .set({ Origin: 'https://attacker.example', 'X-CSRF-Token': maker.csrf })
      .send({ displayName: 'Changed cross-site' })
      .expect(403);
    expect(res.body.error.code).toBe('csrf_failed');
    expect(await displayNameOf('ilse-marrow')).toBe('Ilse Marrow');
  });

  it('refuses a request with no Origin header', async () => {
    const res = await maker.agent
      .patch('/api/me')
      .set('X-CSRF-Token', maker.csrf)
      .send({ displayName: 'No origin' })
      .expect(403);
    expect(res.body.error.code).toBe('csrf_failed');
  });

  it('refuses a token from another session', async () => {
    const other = await t.signIn('bram-tolliver');
    const res = await maker.agent
      .patch('/api/me')
      .set({ Origin: t.config.appOrigin, 'X-CSRF-Token': other.csrf })
      .send({ displayName: 'Borrowed token' })
      .expect(403);
    expect(res.body.error.code).toBe('csrf_failed');
  });

  it('accepts the same request with the token and a same-origin Origin', async () => {
    const res = await maker.agent.patch('/api/me').set(maker.headers).send({ displayName: 'Ilse M.' }).expect(200);
    expect(res.body.displayName).toBe('Ilse M.');
    await maker.agent.patch('/api/me').set(maker.headers).send({ displayName: 'Ilse Marrow' }).expect(200);
  });
});

describe('request bodies', () => {
  it('answers malformed JSON with 400 malformed_json in the error shape, without a stack trace', async () => {
    const res = await maker.agent
      .patch('/api/me')
      .set(maker.headers)
      .set('Content-Type', 'application/json')
      .send('{"displayName": "unterminated')
      .expect(400);
    expect(res.body).toEqual({ error: { code: 'malformed_json', message: expect.any(String) } });
    expect(res.text).not.toMatch(/at .+\.(ts|js):\d+/);
  });

  it('answers a non-JSON content type with 415', async () => {
    const res = await maker.agent
      .patch('/api/me')
      .set(maker.headers)
      .set('Content-Type', 'text/plain')
      .send('displayName=x')
      .expect(415);
    expect(res.body.error.code).toBe('unsupported_media_type');
  });

  it('answers an oversized body with 413', async () => {
    const res = await maker.agent
      .patch('/api/me')
      .set(maker.headers)
      .send({ displayName: 'x'.repeat(1_100_000) })
      .expect(413);
    expect(res.body.error.code).toBe('payload_too_large');
  });

  it('refuses unknown fields with 400 and names them', async () => {
    const res = await maker.agent
      .patch('/api/me')
      .set(maker.headers)
      .send({ displayName: 'Ilse Marrow', role: 'admin' })
      .expect(400);
    expect(res.body.error.code).toBe('validation_failed');
    expect(JSON.stringify(res.body.error.details)).toContain('role');
  });

  it('refuses a wrong type with 400 and the field path', async () => {
    const res = await maker.agent.patch('/api/me').set(maker.headers).send({ displayName: 42 }).expect(400);
    expect(res.body.error.details.issues[0].path).toBe('displayName');
  });

  it('refuses NUL and broken surrogates in text instead of failing at the database', async () => {
    const nul = await maker.agent.patch('/api/me').set(maker.headers).send({ displayName: 'Ilse\u0000' }).expect(400);
    expect(nul.body.error.code).toBe('validation_failed');
    const surrogate = await maker.agent
      .patch('/api/me')
      .set(maker.headers)
      .set('Content-Type', 'application/json')
      .send('{"displayName":"Ilse \\ud800"}')
      .expect(400);
    expect(surrogate.body.error.code).toBe('validation_failed');
    expect(await displayNameOf('ilse-marrow')).toBe('Ilse Marrow');
  });

  it('keeps emoji, combining marks and right-to-left text intact', async () => {
    const name = 'Ilse 🔧 Marrów עברית';
    const res = await maker.agent.patch('/api/me').set(maker.headers).send({ displayName: name }).expect(200);
    expect(res.body.displayName).toBe(name);
    await maker.agent.patch('/api/me').set(maker.headers).send({ displayName: 'Ilse Marrow' }).expect(200);
  });

  it('grants nothing for a prototype-pollution body', async () => {
    const res = await maker.agent
      .patch('/api/me')
      .set(maker.headers)
      .set('Content-Type', 'application/json')
      .send('{"displayName":"Ilse Marrow","__proto__":{"role":"admin"},"constructor":{"prototype":{"role":"admin"}}}');
    expect(res.status).toBe(400);
    expect(({} as Record<string, unknown>).role).toBeUndefined();
    const me = await maker.agent.get('/api/me').expect(200);
    expect(me.body.user.role).toBe('member');
    await maker.agent.get('/api/admin/users').expect(403);
  });
});

describe('errors and headers', () => {
  it('answers an unknown API route with 404 in the error shape', async () => {
    const res = await t.agent().get('/api/no-such-thing').expect(404);
    expect(res.body.error.code).toBe('not_found');
  });

  it('sends a strict Content-Security-Policy without inline scripts, and other safety headers', async () => {
    const res = await t.agent().get('/api/health');
    const csp = res.headers['content-security-policy'] as string;
    expect(csp).toContain("script-src 'self'");
    expect(csp).not.toMatch(/script-src[^;]*unsafe-inline/);
    expect(csp).toContain("object-src 'none'");
    expect(csp).toContain("frame-ancestors 'none'");
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['x-powered-by']).toBeUndefined();
  });
});
