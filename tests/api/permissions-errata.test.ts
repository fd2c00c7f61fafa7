/**
 * The permission rows of the design document for errata, proposals and comments, every role
 * against every route, on one project where ilse-marrow is owner and juniper-okoye editor.
 * Where the issue is more specific than the table it wins: members who edit a project do not
 * propose on it (they change it directly), so owner and editor are refused there.
 * Every refused cell is checked to change nothing.
 */
import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, type SignedInAgent, type TestApp } from '../setup/app';

type Role = 'anonymous' | 'member' | 'editor' | 'owner' | 'moderator' | 'admin';
const ROLES: Role[] = ['anonymous', 'member', 'editor', 'owner', 'moderator', 'admin'];

let t: TestApp;
const as = {} as Record<Exclude<Role, 'anonymous'>, SignedInAgent>;
let slug: string;
let draftSlug: string;
let revA: number;
let erratumCode: string;

const fields = (title: string) => ({
  title,
  category: 'power',
  severity: 'minor',
  status: 'open',
  affected: [revA],
  symptom: 'x\n',
});

beforeAll(async () => {
  t = await createTestApp();
  as.member = await t.signIn('bram-tolliver');
  as.editor = await t.signIn('juniper-okoye');
  as.owner = await t.signIn('ilse-marrow');
  as.moderator = await t.signIn('odile-fenwick');
  as.admin = await t.signIn('quill-haverford');
  const p = await as.owner.agent.post('/api/projects').set(as.owner.headers).send({ title: 'Matrix Bench', summary: '', licence: 'MIT', hazards: [] }).expect(201);
  slug = p.body.slug;
  await as.owner.agent.post(`/api/projects/${slug}/editors`).set(as.owner.headers).send({ handle: 'juniper-okoye' }).expect(200);
  revA = (await as.owner.agent.post(`/api/projects/${slug}/board-revisions`).set(as.owner.headers).send({ label: 'Rev A' }).expect(201)).body.id;
  erratumCode = (await as.owner.agent.post(`/api/projects/${slug}/errata`).set(as.owner.headers).send(fields('Target')).expect(201)).body.code;
  await as.owner.agent.post(`/api/projects/${slug}/publish`).set(as.owner.headers).expect(200);
  const d = await as.owner.agent.post('/api/projects').set(as.owner.headers).send({ title: 'Matrix Draft', summary: '', licence: 'MIT', hazards: [] }).expect(201);
  draftSlug = d.body.slug;
  await as.owner.agent.post(`/api/projects/${draftSlug}/editors`).set(as.owner.headers).send({ handle: 'juniper-okoye' }).expect(200);
});
afterAll(async () => {
  await t.close();
});

function agentFor(role: Role) {
  if (role === 'anonymous') return { agent: t.agent(), headers: { Origin: t.config.appOrigin } as Record<string, string> };
  return { agent: as[role].agent, headers: as[role].headers };
}

async function count(table: 'errata' | 'revisions' | 'comments' | 'proposals' | 'lessons'): Promise<number> {
  const rows = await t.ctx.db.execute<{ n: number }>(sql.raw(`SELECT count(*)::int AS n FROM ${table}`));
  return rows.rows[0]!.n;
}

async function newProposal(title: string): Promise<number> {
  const res = await as.member.agent.post(`/api/projects/${slug}/proposals`).set(as.member.headers).send({ kind: 'new_erratum', payload: fields(title) }).expect(201);
  return res.body.id;
}

interface Row {
  name: string;
  expect: Record<Role, number>;
  /** Runs the request for one role; `i` makes titles unique. */
  run(role: Role, i: number): Promise<{ status: number }>;
  /** What must not change when the cell is refused. */
  unchanged: Array<'errata' | 'revisions' | 'comments' | 'proposals' | 'lessons'>;
}

const rows: Row[] = [
  {
    name: 'read the errata of a published project',
    expect: { anonymous: 200, member: 200, editor: 200, owner: 200, moderator: 200, admin: 200 },
    run: (role) => agentFor(role).agent.get(`/api/projects/${slug}/errata`),
    unchanged: [],
  },
  {
    name: 'read the errata of a draft',
    expect: { anonymous: 404, member: 404, editor: 200, owner: 200, moderator: 404, admin: 200 },
    run: (role) => agentFor(role).agent.get(`/api/projects/${draftSlug}/errata`),
    unchanged: [],
  },
  {
    name: 'record an erratum',
    expect: { anonymous: 401, member: 403, editor: 201, owner: 201, moderator: 403, admin: 403 },
    run: (role, i) => {
      const a = agentFor(role);
      return a.agent.post(`/api/projects/${slug}/errata`).set(a.headers).send(fields(`Recorded ${role} ${i}`));
    },
    unchanged: ['errata', 'revisions'],
  },
  {
    name: 'edit an erratum',
    expect: { anonymous: 401, member: 403, editor: 200, owner: 200, moderator: 403, admin: 403 },
    run: async (role, i) => {
      const current = (await t.agent().get(`/api/projects/${slug}/errata/${erratumCode}`)).body;
      const a = agentFor(role);
      return a.agent.put(`/api/projects/${slug}/errata/${erratumCode}`).set(a.headers).send({ ...fields(`Target ${role} ${i}`), baseRevision: current.revision });
    },
    unchanged: ['errata', 'revisions'],
  },
  {
    name: 'restore an erratum revision',
    expect: { anonymous: 401, member: 403, editor: 200, owner: 200, moderator: 403, admin: 403 },
    run: async (role) => {
      const current = (await t.agent().get(`/api/projects/${slug}/errata/${erratumCode}`)).body;
      const a = agentFor(role);
      return a.agent.post(`/api/projects/${slug}/errata/${erratumCode}/restore`).set(a.headers).send({ number: 1, baseRevision: current.revision });
    },
    unchanged: ['revisions'],
  },
  {
    name: 'add a lesson',
    expect: { anonymous: 401, member: 403, editor: 201, owner: 201, moderator: 403, admin: 403 },
    run: (role, i) => {
      const a = agentFor(role);
      return a.agent.post(`/api/projects/${slug}/lessons`).set(a.headers).send({ body: `Lesson ${role} ${i}` });
    },
    unchanged: ['lessons'],
  },
  {
    name: 'propose an erratum',
    expect: { anonymous: 401, member: 201, editor: 403, owner: 403, moderator: 201, admin: 201 },
    run: (role, i) => {
      const a = agentFor(role);
      return a.agent.post(`/api/projects/${slug}/proposals`).set(a.headers).send({ kind: 'new_erratum', payload: fields(`Proposed ${role} ${i}`) });
    },
    unchanged: ['proposals'],
  },
  {
    name: 'accept a proposal',
    expect: { anonymous: 401, member: 403, editor: 200, owner: 200, moderator: 403, admin: 403 },
    run: async (role, i) => {
      const id = await newProposal(`To accept ${role} ${i}`);
      const a = agentFor(role);
      return a.agent.post(`/api/proposals/${id}/accept`).set(a.headers).send({});
    },
    unchanged: ['errata'],
  },
  {
    name: 'decline a proposal',
    expect: { anonymous: 401, member: 403, editor: 200, owner: 200, moderator: 403, admin: 403 },
    run: async (role, i) => {
      const id = await newProposal(`To decline ${role} ${i}`);
      const a = agentFor(role);
      return a.agent.post(`/api/proposals/${id}/decline`).set(a.headers).send({ reason: 'matrix' });
    },
    unchanged: [],
  },
  {
    name: 'comment on an erratum',
    expect: { anonymous: 401, member: 201, editor: 201, owner: 201, moderator: 201, admin: 201 },
    run: (role) => {
      const a = agentFor(role);
      return a.agent.post(`/api/projects/${slug}/errata/${erratumCode}/comments`).set(a.headers).send({ body: `from ${role}` });
    },
    unchanged: ['comments'],
  },
  {
    name: 'comment on a proposal',
    expect: { anonymous: 401, member: 201, editor: 201, owner: 201, moderator: 201, admin: 201 },
    run: async (role, i) => {
      const id = await newProposal(`To discuss ${role} ${i}`);
      const a = agentFor(role);
      return a.agent.post(`/api/proposals/${id}/comments`).set(a.headers).send({ body: `from ${role}` });
    },
    unchanged: ['comments'],
  },
];

describe('permissions for errata, lessons, proposals and comments', () => {
  for (const row of rows) {
    it(row.name, async () => {
      let i = 0;
      const got: Partial<Record<Role, number>> = {};
      for (const role of ROLES) {
        i++;
        const denied = row.expect[role] >= 400;
        const before = denied ? await Promise.all(row.unchanged.map(count)) : [];
        const res = await row.run(role, i);
        got[role] = res.status;
        if (denied && row.unchanged.length) {
          // Setting up the cell (a fresh proposal) is not part of what is refused.
          const after = await Promise.all(row.unchanged.map(count));
          expect(after, `${row.name} as ${role} changed something`).toEqual(before);
        }
      }
      expect(got).toEqual(row.expect);
    });
  }

  it('checks the proposal a refused reviewer touched is still open', async () => {
    const id = await newProposal('Still open');
    for (const role of ['member', 'moderator', 'admin'] as const) {
      await as[role].agent.post(`/api/proposals/${id}/accept`).set(as[role].headers).send({}).expect(403);
    }
    expect((await t.agent().get(`/api/proposals/${id}`)).body.status).toBe('open');
  });
});
