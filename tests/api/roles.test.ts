import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, type SignedInAgent, type TestApp } from '../setup/app';

let t: TestApp;
let admin: SignedInAgent;

beforeAll(async () => {
  t = await createTestApp();
  admin = await t.signIn('quill-haverford');
});
afterAll(async () => {
  await t.close();
});

describe('the admin members list', () => {
  it('is refused to anonymous readers (401) and to members and moderators (403)', async () => {
    expect((await t.agent().get('/api/admin/users')).status).toBe(401);
    const member = await t.signIn('ilse-marrow');
    expect((await member.agent.get('/api/admin/users')).status).toBe(403);
    const moderator = await t.signIn('odile-fenwick');
    expect((await moderator.agent.get('/api/admin/users')).status).toBe(403);
  });

  it('lists and filters members for the admin', async () => {
    const all = await admin.agent.get('/api/admin/users').expect(200);
    expect(all.body.items.map((u: { handle: string }) => u.handle)).toEqual(
      expect.arrayContaining(['ilse-marrow', 'bram-tolliver', 'odile-fenwick', 'quill-haverford']),
    );
    const moderators = await admin.agent.get('/api/admin/users?role=moderator').expect(200);
    expect(moderators.body.items.map((u: { handle: string }) => u.handle)).toEqual(['odile-fenwick']);
    const search = await admin.agent.get('/api/admin/users?q=tolli').expect(200);
    expect(search.body.items).toHaveLength(1);
    const wildcard = await admin.agent.get('/api/admin/users?q=%25').expect(200);
    expect(wildcard.body.items).toHaveLength(0);
  });
});

describe('role changes', () => {
  it('take effect on the member’s next request, and are audited', async () => {
    const bram = await t.signIn('bram-tolliver');
    expect((await bram.agent.get('/api/me')).body.user.role).toBe('member');
    await admin.agent.put('/api/admin/users/bram-tolliver/role').set(admin.headers).send({ role: 'moderator' }).expect(200);
    expect((await bram.agent.get('/api/me')).body.user.role).toBe('moderator');
    const audit = await t.ctx.db.execute<{ action: string; before: unknown; after: unknown }>(
      sql`SELECT action, before, after FROM audit_log WHERE target_kind = 'user' AND target_id = ${String(bram.userId)}`,
    );
    expect(audit.rows).toEqual([{ action: 'user.role', before: { role: 'member' }, after: { role: 'moderator' } }]);
    await admin.agent.put('/api/admin/users/bram-tolliver/role').set(admin.headers).send({ role: 'member' }).expect(200);
  });

  it('cannot be made by a member, even with a valid CSRF token', async () => {
    const member = await t.signIn('ilse-marrow');
    const res = await member.agent
      .put('/api/admin/users/ilse-marrow/role')
      .set(member.headers)
      .send({ role: 'admin' })
      .expect(403);
    expect(res.body.error.code).toBe('forbidden');
    expect((await member.agent.get('/api/me')).body.user.role).toBe('member');
  });

  it('cannot be made by an admin on their own account', async () => {
    await admin.agent.put('/api/admin/users/quill-haverford/role').set(admin.headers).send({ role: 'member' }).expect(403);
  });

  it('refuse an unknown role and an unknown member', async () => {
    await admin.agent.put('/api/admin/users/bram-tolliver/role').set(admin.headers).send({ role: 'owner' }).expect(400);
    await admin.agent.put('/api/admin/users/nobody-here/role').set(admin.headers).send({ role: 'member' }).expect(404);
  });
});

describe('suspension', () => {
  it('ends the member’s sessions at once and keeps them out until reinstated', async () => {
    const juniper = await t.signIn('juniper-okoye');
    const second = await t.signIn('juniper-okoye');
    await admin.agent
      .put('/api/admin/users/juniper-okoye/suspension')
      .set(admin.headers)
      .send({ suspended: true, reason: 'test of suspension' })
      .expect(200);
    expect((await juniper.agent.get('/api/me')).body.user).toBeNull();
    expect((await second.agent.get('/api/me')).body.user).toBeNull();
    const remaining = await t.ctx.db.execute(
      sql`SELECT 1 FROM session WHERE sess->'passport'->>'user' = ${String(juniper.userId)}`,
    );
    expect(remaining.rows).toHaveLength(0);

    // Signing in again is refused while suspended.
    const agent = t.agent();
    const start = await agent.get('/api/auth/github').expect(302);
    const authorize = new URL(start.headers.location as string);
    authorize.searchParams.set('login', 'juniper-okoye');
    const granted = await fetch(authorize, { redirect: 'manual' });
    const back = new URL(granted.headers.get('location')!);
    const res = await agent.get(back.pathname + back.search).expect(303);
    expect(res.headers.location).toBe('/sign-in?failed=suspended');

    await admin.agent
      .put('/api/admin/users/juniper-okoye/suspension')
      .set(admin.headers)
      .send({ suspended: false })
      .expect(200);
    await t.signIn('juniper-okoye');
  });
});

describe('the audit log', () => {
  it('refuses UPDATE, DELETE and TRUNCATE at the database', async () => {
    const refused = { cause: { message: expect.stringMatching(/append-only/) } };
    await expect(t.ctx.db.execute(sql`UPDATE audit_log SET action = 'forged'`)).rejects.toMatchObject(refused);
    await expect(t.ctx.db.execute(sql`DELETE FROM audit_log`)).rejects.toMatchObject(refused);
    await expect(t.ctx.db.execute(sql`TRUNCATE audit_log`)).rejects.toMatchObject(refused);
  });
});

describe('first sign-in of a new provider account', () => {
  it('creates a member keyed on the provider id, with a free handle when the login is taken', async () => {
    // A provider account whose login equals an existing member's handle, but another id.
    t.fake.accounts.set('impostor', { id: 99_999_001, login: 'Ilse-Marrow', name: 'Someone Else', email: 'else@makers.invalid' });
    t.fake.accounts.delete('ilse-marrow');
    const agent = t.agent();
    const start = await agent.get('/api/auth/github').expect(302);
    const authorize = new URL(start.headers.location as string);
    authorize.searchParams.set('login', 'impostor');
    const granted = await fetch(authorize, { redirect: 'manual' });
    const back = new URL(granted.headers.get('location')!);
    await agent.get(back.pathname + back.search).expect(303);
    const me = (await agent.get('/api/me')).body.user;
    expect(me.displayName).toBe('Someone Else');
    expect(me.handle).toBe('Ilse-Marrow-2');
    expect(me.role).toBe('member');
  });
});
