/**
 * Drafts and hidden content never reach people who cannot read them — not in results and not
 * in facet counts — for every role. A draft's own members (owner, editor) and admins find it.
 */
import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { indexPending } from '../../api/search/indexer';
import { createTestApp, type SignedInAgent, type TestApp } from '../setup/app';

type Role = 'anonymous' | 'member' | 'editor' | 'owner' | 'moderator' | 'admin';
let t: TestApp;
const as = {} as Record<Exclude<Role, 'anonymous'>, SignedInAgent>;

beforeAll(async () => {
  t = await createTestApp();
  as.owner = await t.signIn('ilse-marrow');
  as.editor = await t.signIn('juniper-okoye');
  as.member = await t.signIn('bram-tolliver');
  as.moderator = await t.signIn('odile-fenwick');
  as.admin = await t.signIn('quill-haverford');
  // A draft with a distinctive erratum and log entry.
  const draft = await as.owner.agent
    .post('/api/projects')
    .set(as.owner.headers)
    .send({ title: 'Wombat Draft Build', summary: 'not yet public', licence: 'MIT', hazards: [] })
    .expect(201);
  await as.owner.agent
    .post(`/api/projects/${draft.body.slug}/editors`)
    .set(as.owner.headers)
    .send({ handle: 'juniper-okoye' })
    .expect(200);
  const board = await as.owner.agent
    .post(`/api/projects/${draft.body.slug}/board-revisions`)
    .set(as.owner.headers)
    .send({ label: 'Rev A' })
    .expect(201);
  await as.owner.agent
    .post(`/api/projects/${draft.body.slug}/errata`)
    .set(as.owner.headers)
    .send({
      title: 'Wombat relay chatter',
      category: 'power',
      severity: 'critical',
      status: 'open',
      affected: [board.body.id],
    })
    .expect(201);
  await as.owner.agent
    .post(`/api/projects/${draft.body.slug}/log`)
    .set(as.owner.headers)
    .send({ title: 'Wombat day one', loggedOn: '2026-11-30' })
    .expect(201);
  // A published erratum, then hidden by moderation (set directly: the moderation tools come later).
  const published = (await t.agent().get('/api/projects/tide-clock/errata')).body;
  await as.editor.agent
    .post('/api/projects/tide-clock/errata')
    .set(as.editor.headers)
    .send({
      title: 'Numbat hidden erratum',
      category: 'power',
      severity: 'minor',
      status: 'open',
      affected: [published.boards[0].id],
    })
    .expect(201);
  await t.ctx.db.execute(
    sql`UPDATE errata SET hidden_at = now(), hidden_reason = 'test' WHERE title = 'Numbat hidden erratum'`,
  );
  await indexPending(t.ctx);
});
afterAll(async () => {
  await t.close();
});

async function searchAs(role: Role, q: string) {
  const agent = role === 'anonymous' ? t.agent() : as[role].agent;
  const res = await agent.get(`/api/search?q=${encodeURIComponent(q)}`).expect(200);
  return res.body as {
    items: { title: string }[];
    total: { value: number };
    facets: Record<'kind' | 'category' | 'severity' | 'status' | 'tag' | 'part' | 'project', { value: string; count: number }[]>;
  };
}

describe('search privacy', () => {
  const sees: Record<Role, boolean> = {
    anonymous: false,
    member: false,
    editor: true,
    owner: true,
    moderator: false,
    admin: true,
  };
  for (const role of Object.keys(sees) as Role[]) {
    it(`${sees[role] ? 'shows' : 'hides'} a draft's items ${sees[role] ? 'to' : 'from'} ${role === 'editor' || role === 'owner' ? `its ${role}` : `a${role === 'admin' || role === 'anonymous' ? 'n' : ''} ${role}`}`, async () => {
      const res = await searchAs(role, 'wombat');
      if (sees[role]) {
        expect(res.items.map((i) => i.title)).toEqual(
          expect.arrayContaining([
            expect.stringContaining('Wombat relay chatter'),
            'Wombat day one',
            'Wombat Draft Build',
          ]),
        );
        expect(res.facets.project.map((f) => f.value)).toContain('wombat-draft-build');
      } else {
        expect(res.items).toEqual([]);
        expect(res.total.value).toBe(0);
        expect(res.facets.project).toEqual([]);
        expect(res.facets.severity).toEqual([]);
      }
    });
  }

  it('keeps hidden items out of results and facet counts for everyone but admins', async () => {
    for (const role of ['anonymous', 'member', 'moderator'] as const) {
      const res = await searchAs(role, 'numbat');
      expect(res.items, role).toEqual([]);
    }
    const before = await searchAs('anonymous', 'power');
    expect(before.items.some((i) => i.title.includes('Numbat'))).toBe(false);
    expect((await searchAs('admin', 'numbat')).items.length).toBe(1);
  });

  it('drops the items of a project that went back to draft from everyone else', async () => {
    expect((await searchAs('anonymous', 'GPIO35')).items.length).toBeGreaterThan(0);
    const juniper = await t.signIn('juniper-okoye');
    await juniper.agent.post('/api/projects/tide-clock/unpublish').set(juniper.headers).expect(200);
    await indexPending(t.ctx);
    expect((await searchAs('anonymous', 'GPIO35')).items).toEqual([]);
    expect((await searchAs('member', 'GPIO35')).items).toEqual([]);
    expect((await searchAs('editor', 'GPIO35')).items.length).toBeGreaterThan(0);
    await juniper.agent.post('/api/projects/tide-clock/publish').set(juniper.headers).expect(200);
    await indexPending(t.ctx);
    expect((await searchAs('anonymous', 'GPIO35')).items.length).toBeGreaterThan(0);
  });

  it('drops a deleted project’s items at once', async () => {
    const doomed = await as.member.agent
      .post('/api/projects')
      .set(as.member.headers)
      .send({ title: 'Quoll Public Build', summary: '', licence: 'MIT', hazards: [] })
      .expect(201);
    await as.member.agent.post(`/api/projects/${doomed.body.slug}/publish`).set(as.member.headers).expect(200);
    await indexPending(t.ctx);
    expect((await searchAs('anonymous', 'quoll')).items.length).toBeGreaterThan(0);
    await as.member.agent
      .delete(`/api/projects/${doomed.body.slug}`)
      .set(as.member.headers)
      .send({ confirmSlug: doomed.body.slug })
      .expect(204);
    await indexPending(t.ctx);
    expect((await searchAs('anonymous', 'quoll')).items).toEqual([]);
    expect((await searchAs('member', 'quoll')).items).toEqual([]);
  });
});
