/**
 * Tag pages and the tag index: what each reader sees and counts, and the deprecated-tag rule on
 * the lesson and erratum save paths.
 */
import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, type SignedInAgent, type TestApp } from '../setup/app';

let t: TestApp;
let owner: SignedInAgent;
let editor: SignedInAgent;
let moderator: SignedInAgent;
let publishedSlug: string;
let draftSlug: string;

async function newProject(title: string, publish: boolean) {
  const res = await owner.agent
    .post('/api/projects')
    .set(owner.headers)
    .send({ title, summary: '', licence: 'MIT', hazards: [] })
    .expect(201);
  if (publish) await owner.agent.post(`/api/projects/${res.body.slug}/publish`).set(owner.headers).expect(200);
  return res.body.slug as string;
}

async function addLesson(slug: string, body: string, tags: string[], who = owner) {
  const res = await who.agent.post(`/api/projects/${slug}/lessons`).set(who.headers).send({ body, tags });
  return res;
}

beforeAll(async () => {
  t = await createTestApp();
  owner = await t.signIn('ilse-marrow');
  editor = await t.signIn('juniper-okoye');
  moderator = await t.signIn('odile-fenwick');
  publishedSlug = await newProject('Kestrel Bench Timer', true);
  draftSlug = await newProject('Kestrel Draft Rig', false);
  // The moderator adds lessons only through a project they edit.
  await owner.agent
    .post(`/api/projects/${publishedSlug}/editors`)
    .set(owner.headers)
    .send({ handle: 'odile-fenwick' })
    .expect(200);
});
afterAll(async () => {
  await t.close();
});

describe('tag pages', () => {
  it("hides a draft project's lesson from anonymous readers and shows it to the project's owner", async () => {
    const before = (await t.agent().get('/api/tags/decoupling').expect(200)).body;
    const shown = await addLesson(publishedSlug, 'Kestrel: put 100 nF at every supply pin of the timer.', [
      'decoupling',
    ]);
    const secret = await addLesson(draftSlug, 'Kestrel draft: a secret decoupling note.', ['decoupling']);
    expect(shown.status).toBe(201);
    expect(secret.status).toBe(201);

    const anonymous = (await t.agent().get('/api/tags/decoupling').expect(200)).body;
    expect(anonymous.kind).toBe('tag');
    expect(anonymous.tag.counts.lessons).toBe(before.tag.counts.lessons + 1);
    const anonIds = anonymous.lessons.map((l: { id: number }) => l.id);
    expect(anonIds).toContain(shown.body.id);
    expect(anonIds).not.toContain(secret.body.id);
    expect(anonymous.projects.map((p: { slug: string }) => p.slug)).not.toContain(draftSlug);

    const mine = (await owner.agent.get('/api/tags/decoupling').expect(200)).body;
    expect(mine.tag.counts.lessons).toBe(before.tag.counts.lessons + 2);
    const item = mine.lessons.find((l: { id: number }) => l.id === secret.body.id);
    expect(item).toMatchObject({
      excerpt: 'Kestrel draft: a secret decoupling note.',
      project: { slug: draftSlug, title: 'Kestrel Draft Rig' },
      url: `/projects/${draftSlug}#lessons`,
    });

    // The index counts the same way.
    const index = (await t.agent().get('/api/tags').expect(200)).body;
    const entry = index.items.find((i: { slug: string }) => i.slug === 'decoupling');
    expect(entry.counts.lessons).toBe(anonymous.tag.counts.lessons);
    const ownerIndex = (await owner.agent.get('/api/tags').expect(200)).body;
    expect(ownerIndex.items.find((i: { slug: string }) => i.slug === 'decoupling').counts.lessons).toBe(
      mine.tag.counts.lessons,
    );
  });

  it('never shows hidden lessons or errata, not even to their project', async () => {
    const lesson = await addLesson(publishedSlug, 'Kestrel: debounce the start button in hardware.', ['debounce']);
    expect(lesson.status).toBe(201);
    const visible = (await owner.agent.get('/api/tags/debounce').expect(200)).body;
    expect(visible.lessons.map((l: { id: number }) => l.id)).toContain(lesson.body.id);
    await t.ctx.db.execute(
      sql`UPDATE lessons SET hidden_at = now(), hidden_reason = 'test' WHERE id = ${lesson.body.id}`,
    );
    for (const agent of [t.agent(), owner.agent]) {
      const page = (await agent.get('/api/tags/debounce').expect(200)).body;
      expect(page.lessons.map((l: { id: number }) => l.id)).not.toContain(lesson.body.id);
      expect(page.tag.counts.lessons).toBe(visible.tag.counts.lessons - 1);
    }
  });

  it('lists errata with their code, project and client link', async () => {
    const board = await owner.agent
      .post(`/api/projects/${publishedSlug}/board-revisions`)
      .set(owner.headers)
      .send({ label: 'Rev A' })
      .expect(201);
    const erratum = await owner.agent
      .post(`/api/projects/${publishedSlug}/errata`)
      .set(owner.headers)
      .send({
        title: 'Kestrel buzzer browns out the MCU',
        category: 'power',
        severity: 'major',
        status: 'open',
        affected: [board.body.id],
        tags: ['power-budget'],
      })
      .expect(201);
    const page = (await t.agent().get('/api/tags/power-budget').expect(200)).body;
    expect(page.errata).toContainEqual(
      expect.objectContaining({
        code: erratum.body.code,
        title: 'Kestrel buzzer browns out the MCU',
        severity: 'major',
        project: { slug: publishedSlug, title: 'Kestrel Bench Timer' },
        url: `/projects/${publishedSlug}/errata/${erratum.body.code}`,
      }),
    );
    expect(page.feedUrl).toBe('/api/feeds/tags/power-budget.atom');
    expect(page.viewer.canCurate).toBe(false);
    expect((await moderator.agent.get('/api/tags/power-budget').expect(200)).body.viewer.canCurate).toBe(true);
  });

  it('answers 404 for an unknown tag and 400 for a malformed slug', async () => {
    const missing = await t.agent().get('/api/tags/no-such-tag-here').expect(404);
    expect(missing.body.error.code).toBe('not_found');
    await t.agent().get('/api/tags/Not_A_Slug').expect(400);
  });

  it('shows a pending tag only to moderators and to the member who created it', async () => {
    // The demo's own near-duplicate, created by juniper-okoye.
    await t.agent().get('/api/tags/adc-only-pin').expect(404);
    await owner.agent.get('/api/tags/adc-only-pin').expect(404);
    expect((await editor.agent.get('/api/tags/adc-only-pin').expect(200)).body.tag.state).toBe('pending');
    expect((await moderator.agent.get('/api/tags/adc-only-pin').expect(200)).body.tag.state).toBe('pending');
  });
});

describe('the tag index', () => {
  it('filters by text over names and slugs', async () => {
    const res = (await t.agent().get('/api/tags').query({ q: 'PULL' }).expect(200)).body;
    expect(res.items.map((i: { slug: string }) => i.slug)).toEqual(['i2c-pull-ups']);
  });

  it('filters by state: pending ones only for moderators and their creators', async () => {
    const anon = (await t.agent().get('/api/tags').query({ state: 'pending' }).expect(200)).body;
    expect(anon.items).toEqual([]);
    const mod = (await moderator.agent.get('/api/tags').query({ state: 'pending' }).expect(200)).body;
    expect(mod.items.map((i: { slug: string }) => i.slug)).toEqual(
      expect.arrayContaining(['adc-only-pin', 'silkscreen']),
    );
    const creator = (await editor.agent.get('/api/tags').query({ state: 'pending' }).expect(200)).body;
    expect(creator.items.map((i: { slug: string }) => i.slug)).toContain('adc-only-pin');
    const approved = (await t.agent().get('/api/tags').query({ state: 'approved' }).expect(200)).body;
    expect(approved.items.length).toBeGreaterThanOrEqual(28); // the starting vocabulary (migration 0004)
    expect(approved.items.every((i: { state: string }) => i.state === 'approved')).toBe(true);
    await t.agent().get('/api/tags').query({ state: 'rejected' }).expect(400);
  });

  it('sorts by name, by count and by newest', async () => {
    const byName = (await t.agent().get('/api/tags').query({ sort: 'name' }).expect(200)).body.items;
    const names = byName.map((i: { name: string }) => i.name.toLowerCase());
    // "5 V tolerance" sorts before letters; "Analog-only pin" comes early.
    expect(names[0]).toBe('5 v tolerance');
    expect(names.indexOf('analog-only pin')).toBeLessThan(names.indexOf('watchdog'));

    // Kestrel's lessons make "decoupling" one of the most used tags seen by anyone.
    const byCount = (await t.agent().get('/api/tags').query({ sort: 'count' }).expect(200)).body.items;
    for (let i = 1; i < byCount.length; i++) {
      expect(byCount[i - 1].counts.total).toBeGreaterThanOrEqual(byCount[i].counts.total);
    }
    expect(byCount.at(-1).counts.total).toBe(0);

    // A tag a moderator creates now is the newest.
    const res = await addLesson(publishedSlug, 'Kestrel: label the piezo polarity.', ['Piezo polarity'], moderator);
    expect(res.status).toBe(201);
    const newest = (await t.agent().get('/api/tags').query({ sort: 'newest' }).expect(200)).body.items;
    expect(newest[0].slug).toBe('piezo-polarity');
  });
});

describe('deprecated tags', () => {
  it('refuses adding a deprecated tag with a 400 and keeps it on content that has it', async () => {
    const kept = await addLesson(publishedSlug, 'Kestrel: the enclosure needs a vent over the regulator.', [
      'enclosure',
    ]);
    expect(kept.status).toBe(201);
    await moderator.agent
      .post('/api/tags/enclosure/deprecate')
      .set(moderator.headers)
      .send({ reason: 'Too broad; use mechanical tags' })
      .expect(200);

    const refused = await addLesson(publishedSlug, 'Kestrel: another enclosure note.', ['Enclosure']);
    expect(refused.status).toBe(400);
    expect(refused.body.error.code).toBe('validation_failed');
    expect(refused.body.error.details.issues[0].path).toBe('tags');
    expect(refused.body.error.message).toMatch(/deprecated/);

    // Existing use stays, is shown, and survives a save that keeps it.
    const page = (await t.agent().get('/api/tags/enclosure').expect(200)).body;
    expect(page.tag.state).toBe('deprecated');
    expect(page.lessons.map((l: { id: number }) => l.id)).toContain(kept.body.id);
    const saved = await owner.agent
      .put(`/api/projects/${publishedSlug}/lessons/${kept.body.id}`)
      .set(owner.headers)
      .send({ body: 'Kestrel: the enclosure needs a vent above the regulator.', tags: ['enclosure'], baseRevision: 1 });
    expect(saved.status, JSON.stringify(saved.body)).toBe(200);
    expect(saved.body.lesson.tags).toEqual([{ slug: 'enclosure', name: 'Enclosure', state: 'deprecated' }]);

    // Adding it to an existing erratum that lacks it is refused too.
    const list = (await t.agent().get(`/api/projects/${publishedSlug}/errata`).expect(200)).body.items;
    const code = list[0].code as string;
    const detail = (await owner.agent.get(`/api/projects/${publishedSlug}/errata/${code}`).expect(200)).body;
    const bad = await owner.agent
      .put(`/api/projects/${publishedSlug}/errata/${code}`)
      .set(owner.headers)
      .send({
        title: detail.title,
        category: detail.category.slug ?? detail.category,
        severity: detail.severity,
        status: detail.status,
        affected: detail.affected.map((a: { id: number }) => a.id),
        tags: ['enclosure'],
        baseRevision: detail.revision,
      });
    expect(bad.status, JSON.stringify(bad.body)).toBe(400);
    expect(bad.body.error.details.issues[0].path).toBe('tags');

    // Undeprecated, it takes new use again.
    await moderator.agent.post('/api/tags/enclosure/undeprecate').set(moderator.headers).send({}).expect(200);
    expect((await addLesson(publishedSlug, 'Kestrel: enclosure screws.', ['enclosure'])).status).toBe(201);
  });
});
