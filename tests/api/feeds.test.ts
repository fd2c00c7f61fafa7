/**
 * Atom feeds per tag and per project: well-formed XML, absolute links from APP_ORIGIN, and never
 * a hidden item or anything from a draft.
 */
import { sql } from 'drizzle-orm';
import { Window } from 'happy-dom';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, type SignedInAgent, type TestApp } from '../setup/app';

let t: TestApp;
let owner: SignedInAgent;
let moderator: SignedInAgent;
let slug: string;
let draftSlug: string;
const ATOM_NS = 'http://www.w3.org/2005/Atom';

/**
 * A strict XML parse (happy-dom's DOMParser: a malformed document yields a <parsererror>). It does
 * not read CDATA sections, so each is first turned into the equivalent escaped text; a CDATA
 * section that is not closed stays and fails the parse.
 */
function parseAtom(xml: string) {
  const window = new Window();
  const escaped = xml.replace(/<!\[CDATA\[([\s\S]*?)\]\]>/g, (_, text: string) =>
    text.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;'),
  );
  const doc = new window.DOMParser().parseFromString(escaped, 'application/xml');
  expect(doc.getElementsByTagName('parsererror').length, xml.slice(0, 300)).toBe(0);
  expect(doc.documentElement.tagName).toBe('feed');
  expect(doc.documentElement.getAttribute('xmlns')).toBe(ATOM_NS);
  const entries = [...doc.getElementsByTagName('entry')].map((e) => ({
    title: e.getElementsByTagName('title')[0]?.textContent ?? '',
    href: e.getElementsByTagName('link')[0]?.getAttribute('href') ?? '',
    id: e.getElementsByTagName('id')[0]?.textContent ?? '',
  }));
  return { doc, entries };
}

async function project(title: string, publish: boolean) {
  const res = await owner.agent
    .post('/api/projects')
    .set(owner.headers)
    .send({ title, summary: `${title} summary`, licence: 'MIT', hazards: [] })
    .expect(201);
  if (publish) await owner.agent.post(`/api/projects/${res.body.slug}/publish`).set(owner.headers).expect(200);
  const board = await owner.agent
    .post(`/api/projects/${res.body.slug}/board-revisions`)
    .set(owner.headers)
    .send({ label: 'Rev A' })
    .expect(201);
  return { slug: res.body.slug as string, board: board.body.id as number };
}

async function erratum(projectSlug: string, board: number, title: string, tags: string[]) {
  const res = await owner.agent
    .post(`/api/projects/${projectSlug}/errata`)
    .set(owner.headers)
    .send({
      title,
      category: 'power',
      severity: 'minor',
      status: 'open',
      affected: [board],
      tags,
      symptom: `${title}.`,
    })
    .expect(201);
  return res.body as { id: number; code: string };
}

beforeAll(async () => {
  t = await createTestApp();
  owner = await t.signIn('ilse-marrow');
  moderator = await t.signIn('odile-fenwick');
  const pub = await project('Plover Tide Logger', true);
  const draft = await project('Plover Secret Rig', false);
  slug = pub.slug;
  draftSlug = draft.slug;
  await erratum(slug, pub.board, 'Plover USB port zaps the MCU', ['esd']);
  const hidden = await erratum(slug, pub.board, 'Plover hidden erratum', ['esd']);
  await t.ctx.db.execute(sql`UPDATE errata SET hidden_at = now(), hidden_reason = 'test' WHERE id = ${hidden.id}`);
  await erratum(draftSlug, draft.board, 'Plover draft erratum', ['esd']);
  await owner.agent
    .post(`/api/projects/${slug}/lessons`)
    .set(owner.headers)
    .send({ body: 'Plover: put a TVS diode on every exposed connector.', tags: ['esd'] })
    .expect(201);
  await owner.agent
    .post(`/api/projects/${draftSlug}/lessons`)
    .set(owner.headers)
    .send({ body: 'Plover draft lesson about ESD.', tags: ['esd'] })
    .expect(201);
  await owner.agent
    .post(`/api/projects/${slug}/log`)
    .set(owner.headers)
    .send({ title: 'Plover first tide', loggedOn: '2026-11-20' })
    .expect(201);
  const hiddenLog = await owner.agent
    .post(`/api/projects/${slug}/log`)
    .set(owner.headers)
    .send({ title: 'Plover hidden log entry', loggedOn: '2026-11-21' })
    .expect(201);
  await t.ctx.db.execute(
    sql`UPDATE documents SET hidden_at = now(), hidden_reason = 'test' WHERE id = ${hiddenLog.body.id as number}`,
  );
});
afterAll(async () => {
  await t.close();
});

describe('tag feeds', () => {
  it("is Atom with the tag's visible lessons and errata, absolute links, and no hidden or draft items", async () => {
    const res = await t.agent().get('/api/feeds/tags/esd.atom').expect(200);
    expect(res.headers['content-type']).toBe('application/atom+xml; charset=utf-8');
    const { doc, entries } = parseAtom(res.text);
    const titles = entries.map((e) => e.title);
    expect(titles).toContain('E1: Plover USB port zaps the MCU (Plover Tide Logger)');
    expect(titles.some((x) => x.startsWith('Lesson — Plover: put a TVS diode'))).toBe(true);
    expect(titles.join('\n')).not.toMatch(/hidden|draft|Secret/i);
    expect(entries.find((e) => e.title.startsWith('E1:'))!.href).toBe(
      `${t.config.appOrigin}/projects/${slug}/errata/E1`,
    );
    for (const e of entries) expect(e.href.startsWith(`${t.config.appOrigin}/`), e.href).toBe(true);
    // The feed lists exactly what an anonymous reader sees on the tag page (fewer than 50 here).
    const page = (await t.agent().get('/api/tags/esd').expect(200)).body;
    expect(entries.length).toBe(page.tag.counts.total);
    // The feed names itself and the tag page.
    const self = [...doc.getElementsByTagName('link')].find((l) => l.getAttribute('rel') === 'self');
    expect(self?.getAttribute('href')).toBe(`${t.config.appOrigin}/api/feeds/tags/esd.atom`);
  });

  it('shows the same to a signed-in owner of a draft: feeds are for anonymous readers', async () => {
    const res = await owner.agent.get('/api/feeds/tags/esd.atom').expect(200);
    expect(res.text).not.toContain('Plover draft');
  });

  it('sends a merged tag to the feed of the tag it went into, and answers unknown or pending tags with 404', async () => {
    await owner.agent
      .post(`/api/projects/${slug}/lessons`)
      .set(owner.headers)
      .send({ body: 'Plover: static on the case.', tags: ['Plover static'] })
      .expect(201);
    await t.agent().get('/api/feeds/tags/plover-static.atom').expect(404); // pending
    await moderator.agent
      .post('/api/tags/plover-static/merge')
      .set(moderator.headers)
      .send({ into: 'esd', reason: 'Same idea' })
      .expect(200);
    const moved = await t.agent().get('/api/feeds/tags/plover-static.atom').expect(301);
    expect(moved.headers.location).toBe('/api/feeds/tags/esd.atom');
    await t.agent().get('/api/feeds/tags/no-such-plover-tag.atom').expect(404);
  });
});

describe('project feeds', () => {
  it('lists new log entries and errata, without hidden ones', async () => {
    const res = await t.agent().get(`/api/feeds/projects/${slug}.atom`).expect(200);
    expect(res.headers['content-type']).toMatch(/^application\/atom\+xml/);
    const { entries } = parseAtom(res.text);
    expect(entries.map((e) => e.title).sort()).toEqual(
      ['E1: Plover USB port zaps the MCU', 'Log: Plover first tide (2026-11-20)'].sort(),
    );
    const log = entries.find((e) => e.title.startsWith('Log:'))!;
    expect(log.href).toMatch(new RegExp(`^${t.config.appOrigin}/projects/${slug}/log/\\d+$`));
  });

  it('answers a draft project with 404, even to its owner', async () => {
    await t.agent().get(`/api/feeds/projects/${draftSlug}.atom`).expect(404);
    await owner.agent.get(`/api/feeds/projects/${draftSlug}.atom`).expect(404);
  });
});
