import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, type SignedInAgent, type TestApp } from '../setup/app';

let t: TestApp;
let owner: SignedInAgent;
let editor: SignedInAgent;
let contributor: SignedInAgent;
let slug: string;
let revA: number;
let sectionId: number;

beforeAll(async () => {
  t = await createTestApp();
  owner = await t.signIn('ilse-marrow');
  editor = await t.signIn('juniper-okoye');
  contributor = await t.signIn('bram-tolliver');
  const project = await owner.agent.post('/api/projects').set(owner.headers).send({ title: 'Proposal Bench', summary: '', licence: 'MIT', hazards: [] }).expect(201);
  slug = project.body.slug;
  sectionId = project.body.sections[1].id;
  await owner.agent.post(`/api/projects/${slug}/editors`).set(owner.headers).send({ handle: 'juniper-okoye' }).expect(200);
  revA = (await owner.agent.post(`/api/projects/${slug}/board-revisions`).set(owner.headers).send({ label: 'Rev A' }).expect(201)).body.id;
  await owner.agent
    .put(`/api/projects/${slug}/documents/${sectionId}`)
    .set(owner.headers)
    .send({ baseRevision: 1, title: 'Hardware', body: 'Intro.\n\nThe regulator is an LDO.\n\nOutro.\n' })
    .expect(200);
  await owner.agent.post(`/api/projects/${slug}/publish`).set(owner.headers).expect(200);
});
afterAll(async () => {
  await t.close();
});

const fields = (over: Record<string, unknown> = {}) => ({
  title: 'Regulator runs hot above 400 mA',
  category: 'power',
  severity: 'major',
  status: 'open',
  affected: [revA],
  fixedIn: null,
  refdes: ['U2'],
  parts: ['AMS1117'],
  pins: [],
  symptom: 'The board resets when the actuator moves.\n',
  cause: 'The LDO dissipates 2.8 W.\n',
  workaround: '',
  fix: '',
  ...over,
});

async function propose(who: SignedInAgent, body: Record<string, unknown>) {
  const res = await who.agent.post(`/api/projects/${slug}/proposals`).set(who.headers).send(body);
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body as { id: number; status: string };
}

async function notificationsOf(handle: string) {
  const rows = await t.ctx.db.execute<{ kind: string; payload: Record<string, unknown> }>(
    sql`SELECT n.kind, n.payload FROM notifications n JOIN users u ON u.id = n.user_id WHERE u.handle = ${handle} ORDER BY n.id`,
  );
  return rows.rows;
}

describe('proposing', () => {
  it('lets a member who does not edit the project propose, and tells its owner and editors', async () => {
    const p = await propose(contributor, { kind: 'new_erratum', payload: fields(), message: 'Seen on my Rev A' });
    expect(p.status).toBe('open');
    const queue = (await owner.agent.get('/api/me/review-queue').expect(200)).body.items;
    expect(queue.map((x: { id: number }) => x.id)).toContain(p.id);
    for (const handle of ['ilse-marrow', 'juniper-okoye']) {
      expect((await notificationsOf(handle)).some((n) => n.kind === 'proposal_received' && n.payload.proposalId === p.id), handle).toBe(true);
    }
    expect((await contributor.agent.get('/api/me/proposals').expect(200)).body.items[0].id).toBe(p.id);
  });

  it('refuses editors (they edit directly) and anonymous visitors', async () => {
    const res = await editor.agent.post(`/api/projects/${slug}/proposals`).set(editor.headers).send({ kind: 'new_erratum', payload: fields() });
    expect(res.status).toBe(403);
    const anon = await t.agent().post(`/api/projects/${slug}/proposals`).set('Origin', t.config.appOrigin).send({ kind: 'new_erratum', payload: fields() });
    expect(anon.status).toBe(401);
  });

  it('refuses a proposal on a draft the member cannot see (404)', async () => {
    const draft = await owner.agent.post('/api/projects').set(owner.headers).send({ title: 'Hidden Draft Bench', summary: '', licence: 'MIT', hazards: [] }).expect(201);
    const res = await contributor.agent.post(`/api/projects/${draft.body.slug}/proposals`).set(contributor.headers).send({ kind: 'new_erratum', payload: fields() });
    expect(res.status).toBe(404);
  });
});

describe('deciding', () => {
  it('accepts a new erratum as is: credited to the proposer, who hears about it', async () => {
    const p = await propose(contributor, { kind: 'new_erratum', payload: fields({ title: 'Accepted as is' }) });
    const decision = await owner.agent.post(`/api/proposals/${p.id}/accept`).set(owner.headers).send({}).expect(200);
    expect(decision.body.proposal).toMatchObject({ status: 'accepted', decidedBy: { handle: 'ilse-marrow' } });
    const number = decision.body.result.erratumNumber as number;
    const erratum = (await t.agent().get(`/api/projects/${slug}/errata/E${number}`).expect(200)).body;
    expect(erratum).toMatchObject({ title: 'Accepted as is', reportedBy: { handle: 'bram-tolliver' } });
    const history = (await t.agent().get(`/api/projects/${slug}/errata/E${number}/revisions`)).body.items;
    expect(history[0]).toMatchObject({ origin: 'proposal', author: { handle: 'ilse-marrow' }, creditedTo: { handle: 'bram-tolliver' } });
    expect((await notificationsOf('bram-tolliver')).some((n) => n.kind === 'proposal_decided' && n.payload.decision === 'accepted')).toBe(true);
  });

  it('lets the reviewer edit before accepting', async () => {
    const p = await propose(contributor, { kind: 'new_erratum', payload: fields({ title: 'Rough title' }) });
    const decision = await owner.agent
      .post(`/api/proposals/${p.id}/accept`)
      .set(owner.headers)
      .send({ payload: fields({ title: 'Tidied title', severity: 'minor' }) })
      .expect(200);
    const erratum = (await t.agent().get(`/api/projects/${slug}/errata/E${decision.body.result.erratumNumber}`)).body;
    expect(erratum).toMatchObject({ title: 'Tidied title', severity: 'minor', reportedBy: { handle: 'bram-tolliver' } });
  });

  it('declines with a reason, and every transition happens once', async () => {
    const p = await propose(contributor, { kind: 'new_erratum', payload: fields({ title: 'Duplicate' }) });
    await owner.agent.post(`/api/proposals/${p.id}/decline`).set(owner.headers).send({ reason: '' }).expect(400);
    const declined = await owner.agent.post(`/api/proposals/${p.id}/decline`).set(owner.headers).send({ reason: 'Same as E1' }).expect(200);
    expect(declined.body.proposal).toMatchObject({ status: 'declined', decisionReason: 'Same as E1' });
    const again = await editor.agent.post(`/api/proposals/${p.id}/accept`).set(editor.headers).send({}).expect(409);
    expect(again.body.error.message).toMatch(/already declined/);
    await contributor.agent.post(`/api/proposals/${p.id}/withdraw`).set(contributor.headers).expect(409);
  });

  it('lets two reviewers race: one decision wins, the other gets 409, and nothing is applied twice', async () => {
    for (let round = 0; round < 5; round++) {
      const p = await propose(contributor, { kind: 'new_erratum', payload: fields({ title: `Race ${round}` }) });
      const [a, b] = await Promise.all([
        owner.agent.post(`/api/proposals/${p.id}/accept`).set(owner.headers).send({}),
        editor.agent.post(`/api/proposals/${p.id}/decline`).set(editor.headers).send({ reason: 'race' }),
      ]);
      expect([a.status, b.status].sort()).toEqual([200, 409]);
      const created = await t.ctx.db.execute(sql`SELECT count(*)::int AS n FROM errata WHERE title = ${`Race ${round}`}`);
      expect(created.rows[0]).toEqual({ n: a.status === 200 ? 1 : 0 });
    }
  });

  it('is refused to the proposer and to members who do not edit the project', async () => {
    const p = await propose(contributor, { kind: 'new_erratum', payload: fields({ title: 'Self accept' }) });
    await contributor.agent.post(`/api/proposals/${p.id}/accept`).set(contributor.headers).send({}).expect(403);
    const moderator = await t.signIn('odile-fenwick');
    await moderator.agent.post(`/api/proposals/${p.id}/decline`).set(moderator.headers).send({ reason: 'no' }).expect(403);
    expect((await t.agent().get(`/api/proposals/${p.id}`).expect(200)).body.status).toBe('open');
  });

  it('lets only the proposer withdraw', async () => {
    const p = await propose(contributor, { kind: 'new_erratum', payload: fields({ title: 'Withdraw me' }) });
    await owner.agent.post(`/api/proposals/${p.id}/withdraw`).set(owner.headers).expect(403);
    const res = await contributor.agent.post(`/api/proposals/${p.id}/withdraw`).set(contributor.headers).expect(200);
    expect(res.body.proposal.status).toBe('withdrawn');
  });
});

describe('edits to existing content', () => {
  it('merges an erratum edit forward when the erratum moved on, and credits the proposer', async () => {
    const created = await owner.agent.post(`/api/projects/${slug}/errata`).set(owner.headers).send(fields({ title: 'Moving target' })).expect(201);
    const code = created.body.code as string;
    const p = await propose(contributor, {
      kind: 'erratum_edit',
      erratumNumber: created.body.number,
      baseRevision: 1,
      payload: fields({ title: 'Moving target', cause: 'The LDO dissipates 2.8 W; I measured 97 °C on the tab.\n' }),
    });
    // Meanwhile the owner changes the status.
    await owner.agent.put(`/api/projects/${slug}/errata/${code}`).set(owner.headers).send({ ...fields({ title: 'Moving target', status: 'workaround' }), baseRevision: 1 }).expect(200);
    const detail = (await owner.agent.get(`/api/proposals/${p.id}`).expect(200)).body;
    expect(detail).toMatchObject({ baseRevision: 1, currentRevision: 2, viewer: { canReview: true } });
    expect(detail.forward).toMatchObject({ clean: true, fields: { status: 'workaround', cause: 'The LDO dissipates 2.8 W; I measured 97 °C on the tab.\n' } });
    const accepted = await owner.agent.post(`/api/proposals/${p.id}/accept`).set(owner.headers).send({}).expect(200);
    expect(accepted.body.result.revision).toBe(3);
    const erratum = (await t.agent().get(`/api/projects/${slug}/errata/${code}`)).body;
    expect(erratum).toMatchObject({ status: 'workaround', cause: 'The LDO dissipates 2.8 W; I measured 97 °C on the tab.\n' });
    const history = (await t.agent().get(`/api/projects/${slug}/errata/${code}/revisions`)).body.items;
    expect(history[0]).toMatchObject({ number: 3, creditedTo: { handle: 'bram-tolliver' } });
  });

  it('answers 409 edit_conflict when the proposal overlaps a later change, leaving it open', async () => {
    const created = await owner.agent.post(`/api/projects/${slug}/errata`).set(owner.headers).send(fields({ title: 'Clashing target' })).expect(201);
    const p = await propose(contributor, {
      kind: 'erratum_edit',
      erratumNumber: created.body.number,
      baseRevision: 1,
      payload: fields({ title: 'Clashing target', severity: 'critical' }),
    });
    await owner.agent.put(`/api/projects/${slug}/errata/${created.body.code}`).set(owner.headers).send({ ...fields({ title: 'Clashing target', severity: 'minor' }), baseRevision: 1 }).expect(200);
    const res = await owner.agent.post(`/api/proposals/${p.id}/accept`).set(owner.headers).send({}).expect(409);
    expect(res.body.error.code).toBe('edit_conflict');
    expect((await t.agent().get(`/api/proposals/${p.id}`)).body.status).toBe('open');
    // Edit, then accept on top of the current revision.
    await owner.agent
      .post(`/api/proposals/${p.id}/accept`)
      .set(owner.headers)
      .send({ baseRevision: 2, payload: fields({ title: 'Clashing target', severity: 'critical' }) })
      .expect(200);
    expect((await t.agent().get(`/api/projects/${slug}/errata/${created.body.code}`)).body.severity).toBe('critical');
  });

  it('turns an accepted section edit into a revision credited to the proposer', async () => {
    const doc = (await t.agent().get(`/api/projects/${slug}/documents/${sectionId}`)).body;
    const p = await propose(contributor, {
      kind: 'document_edit',
      documentId: sectionId,
      baseRevision: doc.revision,
      payload: { title: 'Hardware', body: 'Intro.\n\nThe regulator is an LDO; a buck converter runs cooler.\n\nOutro.\n' },
    });
    const res = await editor.agent.post(`/api/proposals/${p.id}/accept`).set(editor.headers).send({}).expect(200);
    expect(res.body.result).toMatchObject({ documentId: sectionId, revision: doc.revision + 1 });
    const history = (await t.agent().get(`/api/projects/${slug}/documents/${sectionId}/revisions`)).body.items;
    expect(history[0]).toMatchObject({ origin: 'proposal', author: { handle: 'juniper-okoye' }, creditedTo: { handle: 'bram-tolliver' } });
  });
});

describe('discussion on a proposal', () => {
  it('notifies the proposer and the project members, never the commenter', async () => {
    const p = await propose(contributor, { kind: 'new_erratum', payload: fields({ title: 'Talk about it' }) });
    await t.agent().post(`/api/proposals/${p.id}/comments`).set('Origin', t.config.appOrigin).send({ body: 'x' }).expect(401);
    await owner.agent.post(`/api/proposals/${p.id}/comments`).set(owner.headers).send({ body: 'Which board **exactly**?' }).expect(201);
    const bramNotes = await notificationsOf('bram-tolliver');
    expect(bramNotes.at(-1)).toMatchObject({ kind: 'comment', payload: { proposalId: p.id, excerpt: 'Which board exactly?' } });
    const list = (await t.agent().get(`/api/proposals/${p.id}/comments`).expect(200)).body;
    expect(list.items).toHaveLength(1);
  });
});
