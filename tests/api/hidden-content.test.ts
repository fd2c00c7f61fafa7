/**
 * Hidden content on every read path (shared/contracts/moderation.ts, header): once a moderator
 * hides it, people other than those responsible get 410 with the public reason for the thing
 * itself, do not see it in lists, and search stops finding it; the owner (or author) and the
 * moderators still see it, marked with the reason; restoring brings it back for everyone.
 * ilse-marrow owns the project, bram-tolliver is the member who commented and proposed.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { indexPending } from '../../api/search/indexer';
import { processUploadVariants } from '../../api/uploads/jobs';
import { jpeg } from '../fixtures/uploads/files';
import { multipartBody } from '../fixtures/uploads/multipart';
import { createTestApp, type SignedInAgent, type TestApp } from '../setup/app';

let t: TestApp;
let owner: SignedInAgent;
let member: SignedInAgent;
let moderator: SignedInAgent;
let slug: string;
const ids = {} as Record<'project' | 'logEntry' | 'erratum' | 'lesson' | 'comment' | 'proposal' | 'upload', number>;
let erratumNumber: number;

const REASON = 'Removed while the moderators check a safety report';

beforeAll(async () => {
  t = await createTestApp();
  owner = await t.signIn('ilse-marrow');
  member = await t.signIn('bram-tolliver');
  moderator = await t.signIn('odile-fenwick');
  const h = owner.headers;
  const p = await owner.agent
    .post('/api/projects')
    .set(h)
    .send({
      title: 'Axolotl Tank Chiller',
      summary: 'Peltier chiller with a quokkaform controller',
      licence: 'MIT',
      hazards: [],
    })
    .expect(201);
  slug = p.body.slug;
  ids.project = p.body.id;
  const revA = (
    await owner.agent.post(`/api/projects/${slug}/board-revisions`).set(h).send({ label: 'Rev A' }).expect(201)
  ).body.id;
  ids.logEntry = (
    await owner.agent
      .post(`/api/projects/${slug}/log`)
      .set(h)
      .send({ title: 'Pelican fan test', loggedOn: '2026-11-02', body: 'Ran the pelicanfan for an hour.\n' })
      .expect(201)
  ).body.id;
  const erratum = await owner.agent
    .post(`/api/projects/${slug}/errata`)
    .set(h)
    .send({
      title: 'Wallaby sensor drift',
      category: 'power',
      severity: 'major',
      status: 'open',
      affected: [revA],
      symptom: 'Wallabydrift after an hour\n',
    })
    .expect(201);
  ids.erratum = erratum.body.id;
  erratumNumber = erratum.body.number;
  ids.lesson = (
    await owner.agent
      .post(`/api/projects/${slug}/lessons`)
      .set(h)
      .send({ body: 'Dingoblock the thermal pad before tightening.' })
      .expect(201)
  ).body.id;
  const { body, contentType } = multipartBody([
    { name: 'file', filename: 'chiller.jpg', data: await jpeg(640, 480, 7), type: 'image/jpeg' },
  ]);
  const upload = await owner.agent
    .post(`/api/projects/${slug}/uploads`)
    .set(h)
    .set('Content-Type', contentType)
    .send(body)
    .expect(201);
  ids.upload = upload.body.items[0].id;
  expect(await processUploadVariants(t.ctx, ids.upload)).toBe('ready');
  await owner.agent.post(`/api/projects/${slug}/publish`).set(h).expect(200);
  ids.comment = (
    await member.agent
      .post(`/api/projects/${slug}/errata/${erratumNumber}/comments`)
      .set(member.headers)
      .send({ body: 'Try a bigger heatsink' })
      .expect(201)
  ).body.id;
  ids.proposal = (
    await member.agent
      .post(`/api/projects/${slug}/proposals`)
      .set(member.headers)
      .send({
        kind: 'new_erratum',
        payload: { title: 'Fan stalls at 5 V', category: 'power', severity: 'minor', status: 'open', affected: [revA] },
      })
      .expect(201)
  ).body.id;
  await indexPending(t.ctx);
}, 240_000);
afterAll(async () => {
  await t.close();
});

const anon = () => t.agent();

async function hide(kind: string, id: number) {
  await moderator.agent
    .post(`/api/moderation/targets/${kind}/${id}/hide`)
    .set(moderator.headers)
    .send({ reason: REASON })
    .expect(200);
  await indexPending(t.ctx);
}
async function restore(kind: string, id: number) {
  await moderator.agent
    .post(`/api/moderation/targets/${kind}/${id}/restore`)
    .set(moderator.headers)
    .send({})
    .expect(200);
  await indexPending(t.ctx);
}
async function found(q: string): Promise<number> {
  const res = await anon()
    .get(`/api/search?q=${encodeURIComponent(q)}`)
    .expect(200);
  return res.body.items.length;
}
function expectGone(res: {
  status: number;
  body: { error: { code: string; details: { hidden: { reason: string } } } };
}) {
  expect(res.status).toBe(410);
  expect(res.body.error.code).toBe('gone');
  expect(res.body.error.details.hidden.reason).toBe(REASON);
}

describe('a hidden log entry', () => {
  it('answers 410 with the reason, leaves the project page and search, and stays with its owner', async () => {
    expect(await found('pelicanfan')).toBeGreaterThan(0);
    await hide('document', ids.logEntry);
    expectGone(await anon().get(`/api/projects/${slug}/documents/${ids.logEntry}`));
    expectGone(await anon().get(`/api/projects/${slug}/documents/${ids.logEntry}/revisions`));
    const page = await anon().get(`/api/projects/${slug}`).expect(200);
    expect(page.body.logEntries.map((d: { id: number }) => d.id)).not.toContain(ids.logEntry);
    expect(await found('pelicanfan')).toBe(0);
    const own = await owner.agent.get(`/api/projects/${slug}/documents/${ids.logEntry}`).expect(200);
    expect(own.body.hidden.reason).toBe(REASON);
    const ownPage = await owner.agent.get(`/api/projects/${slug}`).expect(200);
    expect(ownPage.body.logEntries.find((d: { id: number }) => d.id === ids.logEntry).hidden.reason).toBe(REASON);
    const mod = await moderator.agent.get(`/api/projects/${slug}/documents/${ids.logEntry}`).expect(200);
    expect(mod.body.hidden.reason).toBe(REASON);
  });

  it('comes back for everyone when restored', async () => {
    await restore('document', ids.logEntry);
    const res = await anon().get(`/api/projects/${slug}/documents/${ids.logEntry}`).expect(200);
    expect(res.body.hidden).toBeNull();
    expect(
      (await anon().get(`/api/projects/${slug}`).expect(200)).body.logEntries.map((d: { id: number }) => d.id),
    ).toContain(ids.logEntry);
    expect(await found('pelicanfan')).toBeGreaterThan(0);
  });
});

describe('a hidden erratum', () => {
  it('answers 410 with the reason, leaves the list and search, and stays listed, marked, for its owner', async () => {
    expect(await found('wallabydrift')).toBeGreaterThan(0);
    await hide('erratum', ids.erratum);
    expectGone(await anon().get(`/api/projects/${slug}/errata/${erratumNumber}`));
    expectGone(await anon().get(`/api/projects/${slug}/errata/${erratumNumber}/revisions`));
    expectGone(await anon().get(`/api/projects/${slug}/errata/${erratumNumber}/comments`));
    const list = await anon().get(`/api/projects/${slug}/errata`).expect(200);
    expect(list.body.items.map((e: { id: number }) => e.id)).not.toContain(ids.erratum);
    expect(await found('wallabydrift')).toBe(0);
    const ownList = await owner.agent.get(`/api/projects/${slug}/errata`).expect(200);
    expect(ownList.body.items.find((e: { id: number }) => e.id === ids.erratum).hidden.reason).toBe(REASON);
    expect(
      (await owner.agent.get(`/api/projects/${slug}/errata/${erratumNumber}`).expect(200)).body.hidden.reason,
    ).toBe(REASON);
  });

  it('comes back for everyone when restored', async () => {
    await restore('erratum', ids.erratum);
    expect((await anon().get(`/api/projects/${slug}/errata/${erratumNumber}`).expect(200)).body.hidden).toBeNull();
    expect(await found('wallabydrift')).toBeGreaterThan(0);
  });
});

describe('a hidden lesson', () => {
  it('leaves the list and search for readers and stays listed, marked, for its owner', async () => {
    expect(await found('dingoblock')).toBeGreaterThan(0);
    await hide('lesson', ids.lesson);
    const list = await anon().get(`/api/projects/${slug}/lessons`).expect(200);
    expect(list.body.items.map((l: { id: number }) => l.id)).not.toContain(ids.lesson);
    expect(await found('dingoblock')).toBe(0);
    const own = await owner.agent.get(`/api/projects/${slug}/lessons`).expect(200);
    expect(own.body.items.find((l: { id: number }) => l.id === ids.lesson).hidden.reason).toBe(REASON);
  });

  it('comes back for everyone when restored', async () => {
    await restore('lesson', ids.lesson);
    expect(
      (await anon().get(`/api/projects/${slug}/lessons`).expect(200)).body.items.map((l: { id: number }) => l.id),
    ).toContain(ids.lesson);
    expect(await found('dingoblock')).toBeGreaterThan(0);
  });
});

describe('a hidden comment', () => {
  const thread = (agent: ReturnType<typeof anon>) =>
    agent.get(`/api/projects/${slug}/errata/${erratumNumber}/comments`).expect(200);
  type ThreadComment = { id: number; body: string; html: string; hidden: { reason: string } | null };
  const inThread = (res: { body: { items: ThreadComment[] } }) => res.body.items.find((c) => c.id === ids.comment)!;

  it('keeps its place with the reason and no text for readers (the project owner included), and its text for its author', async () => {
    await hide('comment', ids.comment);
    for (const reader of [anon(), owner.agent]) {
      const c = inThread(await thread(reader));
      expect(c).toMatchObject({ body: '', html: '', hidden: { reason: REASON } });
    }
    const mine = inThread(await thread(member.agent));
    expect(mine.body).toBe('Try a bigger heatsink');
    expect(mine.hidden?.reason).toBe(REASON);
  });

  it('shows its text to everyone again when restored', async () => {
    await restore('comment', ids.comment);
    const c = inThread(await thread(anon()));
    expect(c.body).toBe('Try a bigger heatsink');
    expect(c.hidden).toBeNull();
  });
});

describe('a hidden proposal', () => {
  it('answers 410 with the reason to readers (the project owner included), leaves the list, and stays with its author', async () => {
    await hide('proposal', ids.proposal);
    expectGone(await anon().get(`/api/proposals/${ids.proposal}`));
    expectGone(await owner.agent.get(`/api/proposals/${ids.proposal}`));
    const list = await anon().get(`/api/projects/${slug}/proposals`).expect(200);
    expect(list.body.items.map((p: { id: number }) => p.id)).not.toContain(ids.proposal);
    const mine = await member.agent.get(`/api/proposals/${ids.proposal}`).expect(200);
    expect(mine.body.hidden.reason).toBe(REASON);
  });

  it('comes back for everyone when restored', async () => {
    await restore('proposal', ids.proposal);
    await anon().get(`/api/proposals/${ids.proposal}`).expect(200);
  });
});

describe('a hidden photo', () => {
  it('answers 410 on its record and its files to readers and stays with the project’s owner', async () => {
    await anon().get(`/api/uploads/${ids.upload}/page.webp`).expect(200);
    await hide('upload', ids.upload);
    expectGone(await anon().get(`/api/uploads/${ids.upload}`));
    expect((await anon().get(`/api/uploads/${ids.upload}/page.webp`)).status).toBe(410);
    const gallery = await anon().get(`/api/projects/${slug}/uploads`).expect(200);
    expect(gallery.body.items.map((u: { id: number }) => u.id)).not.toContain(ids.upload);
    expect((await owner.agent.get(`/api/uploads/${ids.upload}`).expect(200)).body.hidden.reason).toBe(REASON);
  });

  it('is served again when restored', async () => {
    await restore('upload', ids.upload);
    await anon().get(`/api/uploads/${ids.upload}/page.webp`).expect(200);
  });
});

describe('a hidden project', () => {
  it('answers 410 with the reason on its page and everything in it, leaves search, and stays with its owner and moderators', async () => {
    expect(await found('quokkaform')).toBeGreaterThan(0);
    await hide('project', ids.project);
    expectGone(await anon().get(`/api/projects/${slug}`));
    expectGone(await member.agent.get(`/api/projects/${slug}/errata/${erratumNumber}`));
    expect(
      (await anon().get('/api/projects').expect(200)).body.items.map((p: { slug: string }) => p.slug),
    ).not.toContain(slug);
    expect(await found('quokkaform')).toBe(0);
    expect(await found('wallabydrift')).toBe(0);
    expect((await owner.agent.get(`/api/projects/${slug}`).expect(200)).body.hidden.reason).toBe(REASON);
    expect((await moderator.agent.get(`/api/projects/${slug}`).expect(200)).body.hidden.reason).toBe(REASON);
  });

  it('comes back for everyone when restored', async () => {
    await restore('project', ids.project);
    expect((await anon().get(`/api/projects/${slug}`).expect(200)).body.hidden).toBeNull();
    expect(await found('quokkaform')).toBeGreaterThan(0);
  });
});
