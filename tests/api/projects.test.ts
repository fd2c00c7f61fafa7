import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { purgeExpiredProjects } from '../../api/projects/service';
import { createTestApp, type SignedInAgent, type TestApp } from '../setup/app';

let t: TestApp;
let maker: SignedInAgent;
let other: SignedInAgent;
let admin: SignedInAgent;

beforeAll(async () => {
  t = await createTestApp();
  maker = await t.signIn('ilse-marrow');
  other = await t.signIn('bram-tolliver');
  admin = await t.signIn('quill-haverford');
});
afterAll(async () => {
  await t.close();
});

const newProject = (title: string, extra: Record<string, unknown> = {}) => ({
  title,
  summary: 'A test build',
  licence: 'CERN-OHL-S-2.0',
  hazards: [],
  ...extra,
});

async function create(agent: SignedInAgent, title: string, extra: Record<string, unknown> = {}) {
  const res = await agent.agent.post('/api/projects').set(agent.headers).send(newProject(title, extra));
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body as { slug: string; revision: number; sections: { id: number; title: string }[] };
}

describe('creating a project', () => {
  it('makes the creator owner, a draft at metadata revision 1, with the standard sections', async () => {
    const project = await create(maker, 'Soil Moisture Logger');
    expect(project.slug).toBe('soil-moisture-logger');
    const detail = (await maker.agent.get(`/api/projects/${project.slug}`).expect(200)).body;
    expect(detail).toMatchObject({ status: 'draft', revision: 1, owner: { handle: 'ilse-marrow' } });
    expect(detail.members).toEqual([expect.objectContaining({ handle: 'ilse-marrow', role: 'owner' })]);
    expect(detail.sections.map((s: { title: string }) => s.title)).toEqual(['Overview', 'Hardware', 'Firmware', 'Postmortem']);
    expect(detail.viewer).toEqual({ canEdit: true, canOwn: true, canRestore: true });
    const revisions = (await maker.agent.get(`/api/projects/${project.slug}/revisions`).expect(200)).body.items;
    expect(revisions).toHaveLength(1);
    expect(revisions[0]).toMatchObject({ number: 1, origin: 'create', author: { handle: 'ilse-marrow' } });
  });

  it('refuses a taken address and suggests a free one', async () => {
    await create(maker, 'Duplicate Name');
    const res = await maker.agent.post('/api/projects').set(maker.headers).send(newProject('Duplicate Name')).expect(409);
    expect(res.body.error.details.suggestion).toBe('duplicate-name-2');
  });

  it('refuses an unknown licence, a non-http repository link and "other" without a description', async () => {
    for (const bad of [{ licence: 'WTFPL-9' }, { repoUrl: 'javascript:alert(1)' }, { licence: 'other' }]) {
      const res = await maker.agent.post('/api/projects').set(maker.headers).send(newProject('Bad One', bad));
      expect(res.status, JSON.stringify(bad)).toBe(400);
    }
    expect((await maker.agent.get('/api/projects/bad-one')).status).toBe(404);
  });

  it('is refused to anonymous visitors', async () => {
    const res = await t.agent().post('/api/projects').set('Origin', t.config.appOrigin).send(newProject('Anon'));
    expect(res.status).toBe(401);
  });
});

describe('drafts and published projects', () => {
  it('hides a draft from everyone but its members and admins (404, not 403)', async () => {
    const project = await create(maker, 'Secret Draft');
    expect((await t.agent().get(`/api/projects/${project.slug}`)).status).toBe(404);
    expect((await other.agent.get(`/api/projects/${project.slug}`)).status).toBe(404);
    expect((await admin.agent.get(`/api/projects/${project.slug}`)).status).toBe(200);
    const published = await t.agent().get('/api/projects').expect(200);
    expect(published.body.items.map((p: { slug: string }) => p.slug)).not.toContain(project.slug);
    const mine = await maker.agent.get('/api/me/projects').expect(200);
    expect(mine.body.items).toContainEqual(expect.objectContaining({ slug: project.slug, status: 'draft', myRole: 'owner' }));
  });

  it('shows a published project to everyone, newest first on the home list', async () => {
    const project = await create(maker, 'Going Public');
    await maker.agent.post(`/api/projects/${project.slug}/publish`).set(maker.headers).expect(200);
    const anon = await t.agent().get(`/api/projects/${project.slug}`).expect(200);
    expect(anon.body.viewer).toEqual({ canEdit: false, canOwn: false, canRestore: false });
    const list = await t.agent().get('/api/projects').expect(200);
    expect(list.body.items[0].slug).toBe(project.slug);
    await maker.agent.post(`/api/projects/${project.slug}/unpublish`).set(maker.headers).expect(200);
    expect((await t.agent().get(`/api/projects/${project.slug}`)).status).toBe(404);
  });

  it('lets no one but members publish or change it', async () => {
    const project = await create(maker, 'Members Only');
    await maker.agent.post(`/api/projects/${project.slug}/publish`).set(maker.headers).expect(200);
    expect((await other.agent.post(`/api/projects/${project.slug}/unpublish`).set(other.headers)).status).toBe(403);
    const res = await other.agent
      .put(`/api/projects/${project.slug}`)
      .set(other.headers)
      .send({ ...newProject('Hijacked'), baseRevision: 1 });
    expect(res.status).toBe(403);
    expect((await t.agent().get(`/api/projects/${project.slug}`)).body.title).toBe('Members Only');
  });
});

describe('project metadata revisions', () => {
  it('needs the base revision (428 without), and keeps every save as a revision', async () => {
    const project = await create(maker, 'Metadata Test');
    const noBase = await maker.agent.put(`/api/projects/${project.slug}`).set(maker.headers).send(newProject('Metadata Test 2'));
    expect(noBase.status).toBe(428);
    expect(noBase.body.error.code).toBe('precondition_required');
    const saved = await maker.agent
      .put(`/api/projects/${project.slug}`)
      .set(maker.headers)
      .set('If-Match', '"1"')
      .send(newProject('Metadata Test 2', { message: 'Better title' }))
      .expect(200);
    expect(saved.body.outcome).toBe('saved');
    expect(saved.body.project.revision).toBe(2);
    const rev1 = await maker.agent.get(`/api/projects/${project.slug}/revisions/1`).expect(200);
    expect(rev1.body.fields.title).toBe('Metadata Test');
  });

  it('merges concurrent changes to different fields and refuses overlapping ones with 409', async () => {
    const project = await create(maker, 'Concurrent Meta');
    const base = { ...newProject('Concurrent Meta'), baseRevision: 1 };
    await maker.agent.put(`/api/projects/${project.slug}`).set(maker.headers).send({ ...base, summary: 'Summary by Ilse' }).expect(200);
    const merged = await maker.agent
      .put(`/api/projects/${project.slug}`)
      .set(maker.headers)
      .send({ ...base, hazards: ['heat'] })
      .expect(200);
    expect(merged.body.outcome).toBe('merged');
    expect(merged.body.project).toMatchObject({ summary: 'Summary by Ilse', hazards: ['heat'], revision: 3 });

    await maker.agent.put(`/api/projects/${project.slug}`).set(maker.headers).send({ ...base, baseRevision: 3, title: 'Title A', hazards: ['heat'], summary: 'Summary by Ilse' }).expect(200);
    const clash = await maker.agent
      .put(`/api/projects/${project.slug}`)
      .set(maker.headers)
      .send({ ...base, baseRevision: 3, title: 'Title B', hazards: ['heat'], summary: 'Summary by Ilse' })
      .expect(409);
    expect(clash.body.error.code).toBe('edit_conflict');
    expect(clash.body.error.details.fieldConflicts).toEqual([{ field: 'title', base: 'Concurrent Meta', ours: 'Title B', theirs: 'Title A' }]);
    expect(clash.body.error.details.current.revision).toBe(4);
  });

  it('restores an earlier revision as a new one and leaves history unchanged', async () => {
    const project = await create(maker, 'Restore Meta');
    await maker.agent.put(`/api/projects/${project.slug}`).set(maker.headers).send({ ...newProject('Renamed'), baseRevision: 1 }).expect(200);
    const restored = await maker.agent
      .post(`/api/projects/${project.slug}/restore`)
      .set(maker.headers)
      .send({ number: 1, baseRevision: 2 })
      .expect(200);
    expect(restored.body.project).toMatchObject({ title: 'Restore Meta', revision: 3 });
    const history = (await maker.agent.get(`/api/projects/${project.slug}/revisions`)).body.items;
    expect(history.map((r: { number: number; origin: string }) => [r.number, r.origin])).toEqual([
      [3, 'restore'],
      [2, 'edit'],
      [1, 'create'],
    ]);
    expect(history[2].contentHash).toBe(history[0].contentHash);
  });
});

describe('editors', () => {
  it('lets the owner add and remove editors; an editor may edit but not manage editors', async () => {
    const project = await create(maker, 'Team Build');
    await maker.agent.post(`/api/projects/${project.slug}/editors`).set(maker.headers).send({ handle: 'juniper-okoye' }).expect(200);
    const juniper = await t.signIn('juniper-okoye');
    await juniper.agent.put(`/api/projects/${project.slug}`).set(juniper.headers).send({ ...newProject('Team Build'), summary: 'by Juniper', baseRevision: 1 }).expect(200);
    expect((await juniper.agent.post(`/api/projects/${project.slug}/editors`).set(juniper.headers).send({ handle: 'bram-tolliver' })).status).toBe(403);
    expect((await juniper.agent.delete(`/api/projects/${project.slug}`).set(juniper.headers).send({ confirmSlug: project.slug })).status).toBe(403);
    await maker.agent.delete(`/api/projects/${project.slug}/editors/juniper-okoye`).set(maker.headers).expect(200);
    expect((await juniper.agent.get(`/api/projects/${project.slug}`)).status).toBe(404);
  });

  it('refuses an unknown handle and removing the owner', async () => {
    const project = await create(maker, 'Team Build Two');
    await maker.agent.post(`/api/projects/${project.slug}/editors`).set(maker.headers).send({ handle: 'nobody-at-all' }).expect(404);
    await maker.agent.delete(`/api/projects/${project.slug}/editors/ilse-marrow`).set(maker.headers).expect(404);
  });
});

describe('board revisions', () => {
  it('are added, changed and removed by editors, with unique labels', async () => {
    const project = await create(maker, 'Boards');
    const a = await maker.agent
      .post(`/api/projects/${project.slug}/board-revisions`)
      .set(maker.headers)
      .send({ label: 'Rev A', releasedOn: '2026-03-14', notes: 'First **five** boards' })
      .expect(201);
    expect(a.body.notesHtml).toContain('<strong>five</strong>');
    await maker.agent.post(`/api/projects/${project.slug}/board-revisions`).set(maker.headers).send({ label: 'rev a' }).expect(409);
    await maker.agent.post(`/api/projects/${project.slug}/board-revisions`).set(maker.headers).send({ label: 'Rev B', releasedOn: '2026-02-30' }).expect(400);
    await maker.agent.put(`/api/projects/${project.slug}/board-revisions/${a.body.id}`).set(maker.headers).send({ label: 'Rev A1', releasedOn: null, notes: '' }).expect(200);
    const detail = (await maker.agent.get(`/api/projects/${project.slug}`)).body;
    expect(detail.boardRevisions.map((b: { label: string }) => b.label)).toEqual(['Rev A1']);
    await maker.agent.delete(`/api/projects/${project.slug}/board-revisions/${a.body.id}`).set(maker.headers).expect(204);
  });
});

describe('the project page', () => {
  it('shows every change at once, although it is cached between changes', async () => {
    const project = await create(maker, 'Cache Check');
    await maker.agent.post(`/api/projects/${project.slug}/publish`).set(maker.headers).expect(200);
    const board = await maker.agent.post(`/api/projects/${project.slug}/board-revisions`).set(maker.headers).send({ label: 'Rev A' }).expect(201);
    const read = async () => (await t.agent().get(`/api/projects/${project.slug}`).expect(200)).body;
    expect((await read()).boardRevisions.map((b: { label: string }) => b.label)).toEqual(['Rev A']);
    await maker.agent.put(`/api/projects/${project.slug}/board-revisions/${board.body.id}`).set(maker.headers).send({ label: 'Rev A2' }).expect(200);
    expect((await read()).boardRevisions.map((b: { label: string }) => b.label)).toEqual(['Rev A2']);
    const section = (await read()).sections[0];
    await maker.agent.put(`/api/projects/${project.slug}/documents/${section.id}`).set(maker.headers).send({ baseRevision: 1, title: section.title, body: 'Fresh **text**' }).expect(200);
    expect((await read()).sections[0].html).toContain('<strong>text</strong>');
    await maker.agent.post(`/api/projects/${project.slug}/editors`).set(maker.headers).send({ handle: 'juniper-okoye' }).expect(200);
    expect((await read()).members.map((m: { handle: string }) => m.handle)).toContain('juniper-okoye');
    await maker.agent.put(`/api/projects/${project.slug}/sections/order`).set(maker.headers).send({ ids: [...(await read()).sections.map((s: { id: number }) => s.id)].reverse() }).expect(200);
    expect((await read()).sections.at(-1).id).toBe(section.id);
  });
});

describe('deleting a project', () => {
  it('needs the owner and the typed address; then it is gone for everyone', async () => {
    const project = await create(maker, 'Doomed Build');
    await maker.agent.post(`/api/projects/${project.slug}/publish`).set(maker.headers).expect(200);
    await maker.agent.delete(`/api/projects/${project.slug}`).set(maker.headers).send({ confirmSlug: 'wrong' }).expect(400);
    expect((await t.agent().get(`/api/projects/${project.slug}`)).status).toBe(200);
    await maker.agent.delete(`/api/projects/${project.slug}`).set(maker.headers).send({ confirmSlug: project.slug }).expect(204);
    expect((await t.agent().get(`/api/projects/${project.slug}`)).status).toBe(404);
    expect((await maker.agent.get(`/api/projects/${project.slug}`)).status).toBe(404);
    expect((await maker.agent.get('/api/me/projects')).body.items.map((p: { slug: string }) => p.slug)).not.toContain(project.slug);
  });

  it('can be undone by an admin within 30 days, and is purged after', async () => {
    const keep = await create(maker, 'Restorable Build');
    const drop = await create(maker, 'Purged Build');
    for (const p of [keep, drop]) {
      await maker.agent.delete(`/api/projects/${p.slug}`).set(maker.headers).send({ confirmSlug: p.slug }).expect(204);
    }
    expect((await maker.agent.get('/api/admin/projects/deleted')).status).toBe(403);
    const list = (await admin.agent.get('/api/admin/projects/deleted').expect(200)).body.items;
    expect(list.map((p: { slug: string }) => p.slug)).toEqual(expect.arrayContaining([keep.slug, drop.slug]));
    await admin.agent.post(`/api/admin/projects/${keep.slug}/restore`).set(admin.headers).expect(200);
    expect((await maker.agent.get(`/api/projects/${keep.slug}`)).status).toBe(200);

    // 31 days later the sweep removes what is still deleted, with its documents and revisions.
    const purged = await purgeExpiredProjects(t.ctx, new Date(Date.now() + 31 * 86_400_000));
    expect(purged).toContain(drop.slug);
    expect(purged).not.toContain(keep.slug);
    const left = await t.ctx.db.execute(sql`SELECT count(*)::int AS n FROM projects WHERE slug = ${drop.slug}`);
    expect(left.rows[0]).toEqual({ n: 0 });
    await admin.agent.post(`/api/admin/projects/${drop.slug}/restore`).set(admin.headers).expect(404);
  });
});
