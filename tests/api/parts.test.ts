import { and, count, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parts, revisions } from '../../db/schema';
import { loadPartProfiles } from '../../db/parts/load';
import { seedParts } from '../../db/parts/seed';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { loadConfig } from '../../api/config';
import { startServer } from '../../api/server';
import { users } from '../../db/schema';
import { createTestApp, type SignedInAgent, type TestApp } from '../setup/app';
import { createTestDatabase } from '../setup/db';

let t: TestApp;
let maker: SignedInAgent;
let moderator: SignedInAgent;

interface Mention {
  kind: string;
  title: string;
  url: string;
  projectSlug: string;
  pins: string[];
}

beforeAll(async () => {
  t = await createTestApp();
  maker = await t.signIn('ilse-marrow');
  moderator = await t.signIn('odile-fenwick');
});
afterAll(async () => {
  await t.close();
});

async function partRevisionCount() {
  const [row] = await t.database.db.select({ n: count() }).from(revisions).where(eq(revisions.subject, 'part'));
  return row!.n;
}

describe('seeding the parts library', () => {
  it('has every shipped profile at revision 1 after the demo seed, and a second run changes nothing', async () => {
    const shipped = loadPartProfiles()
      .map((p) => p.slug)
      .sort();
    const rows = await t.database.db.select({ slug: parts.slug, revision: parts.currentRevision }).from(parts);
    expect(rows.map((r) => r.slug).sort()).toEqual(shipped);
    expect(rows.every((r) => r.revision === 1)).toBe(true);
    const before = await partRevisionCount();
    expect(before).toBe(shipped.length);
    const again = await seedParts(t.database.db);
    expect(again.inserted).toEqual([]);
    expect(again.updated).toEqual([]);
    expect(again.unchanged.sort()).toEqual(shipped);
    expect(await partRevisionCount()).toBe(before);
  });

  it('seeds the parts at server start without demo data, so a production database has them too', async () => {
    const database = await createTestDatabase();
    // No request is made: any free port will do (0), with no race for a port picked beforehand.
    const server = await startServer(
      loadConfig({
        NODE_ENV: 'test',
        PORT: '0',
        APP_ORIGIN: 'http://localhost:3000',
        FAKE_GITHUB_PORT: '0',
        FAKE_SMTP_PORT: '0',
        LOG_LEVEL: 'silent',
        SEED_DEMO: 'false',
        UPLOADS_DIR: fs.mkdtempSync(path.join(os.tmpdir(), 'rwb-test-uploads-')),
      }),
      { databaseUrl: database.url },
    );
    try {
      const [members] = await database.db.select({ n: count() }).from(users);
      expect(members!.n).toBe(0);
      const slugs = (await database.db.select({ slug: parts.slug }).from(parts)).map((r) => r.slug).sort();
      expect(slugs).toEqual(
        loadPartProfiles()
          .map((p) => p.slug)
          .sort(),
      );
    } finally {
      await server.stop();
      await database.drop();
    }
  });

  it('updates a part still at revision 1 in place when its shipped profile changed', async () => {
    const profiles = loadPartProfiles();
    const changed = profiles.map((p) => (p.slug === 'rp2040' ? { ...p, summary: 'Shipped summary, corrected' } : p));
    const result = await seedParts(t.database.db, changed);
    expect(result.updated).toEqual(['rp2040']);
    const page = await t.agent().get('/api/parts/rp2040').expect(200);
    expect(page.body.profile.summary).toBe('Shipped summary, corrected');
    expect(page.body.revision).toBe(1);
    await seedParts(t.database.db, profiles);
  });
});

describe('part pages', () => {
  it('lists parts with their pin counts; the ATmega328P profile has 22 board pins (D0–D13, A0–A7)', async () => {
    const res = await t.agent().get('/api/parts').expect(200);
    const atmega = res.body.items.find((p: { slug: string }) => p.slug === 'atmega328p');
    expect(atmega).toMatchObject({ name: 'ATmega328P', kind: 'microcontroller', pinCount: 22 });
    expect(atmega.mentionCount).toBeGreaterThan(0);
  });

  it('answers the memory architecture of each microcontroller', async () => {
    const expected = { atmega328p: 'avr', rp2040: 'arm', esp32: 'xtensa', '74hc': 'generic' } as const;
    for (const [slug, architecture] of Object.entries(expected)) {
      const res = await t.agent().get(`/api/parts/${slug}`).expect(200);
      expect(res.body.architecture, slug).toBe(architecture);
    }
  });

  it('shows the demo erratum about the relay on A6 on the ATmega328P page, with the pin it names', async () => {
    const res = await t.agent().get('/api/parts/atmega328p').expect(200);
    const mention = (res.body.mentions as Mention[]).find((m) => m.title.includes('A6 is analog input only'));
    expect(mention).toMatchObject({ kind: 'erratum', projectSlug: 'greenhouse-vent-controller' });
    expect(mention!.url).toMatch(/^\/projects\/greenhouse-vent-controller\/errata\/E\d+$/);
    expect(mention!.pins).toContain('A6');
    expect(res.body.viewer.canEdit).toBe(false);
    // The same erratum does not name the RP2040, so it is not on that page.
    const rp = await t.agent().get('/api/parts/rp2040').expect(200);
    expect((rp.body.mentions as Mention[]).some((m) => m.title.includes('A6 is analog input only'))).toBe(false);
  });

  it('lists lessons linked to that erratum, with its pins, and lessons whose text names the part', async () => {
    const atmega = (await t.agent().get('/api/parts/atmega328p').expect(200)).body.mentions as Mention[];
    const linked = atmega.find((m) => m.kind === 'lesson' && m.title.startsWith('Check the pin table before routing'));
    expect(linked).toMatchObject({
      projectSlug: 'greenhouse-vent-controller',
      url: '/projects/greenhouse-vent-controller#lessons',
    });
    expect(linked!.pins).toContain('A6');
    // The tide clock's errata name the module ("ESP32-WROOM", an alias of the ESP32 profile) and
    // GPIO35, which the profile resolves; its lesson is linked to one of them, or names the part.
    const esp32 = (await t.agent().get('/api/parts/esp32').expect(200)).body.mentions as Mention[];
    const named = esp32.find((m) => m.kind === 'lesson' && m.title.startsWith('GPIO34–39 on the ESP32 are input only'));
    expect(named).toMatchObject({ projectSlug: 'tide-clock' });
    const errata = esp32.filter((m) => m.kind === 'erratum' && m.projectSlug === 'tide-clock');
    expect(errata.length).toBeGreaterThan(0);
    expect(errata.flatMap((m) => m.pins)).toContain('GPIO35');
  });

  it("hides a draft project's erratum from anonymous readers and shows it to the project's owner", async () => {
    const project = await maker.agent
      .post('/api/projects')
      .set(maker.headers)
      .send({ title: 'Unreleased Soil Probe', summary: '', licence: 'MIT', hazards: [] })
      .expect(201);
    const slug = project.body.slug as string;
    const board = (
      await maker.agent
        .post(`/api/projects/${slug}/board-revisions`)
        .set(maker.headers)
        .send({ label: 'Rev A' })
        .expect(201)
    ).body.id;
    await maker.agent
      .post(`/api/projects/${slug}/errata`)
      .set(maker.headers)
      .send({
        title: 'Probe reads zero: A7 has no pull-up',
        category: 'pin-capability',
        severity: 'major',
        status: 'open',
        affected: [board],
        fixedIn: null,
        refdes: [],
        // Written in lower case: names compare without case.
        parts: ['atmega328p'],
        pins: ['A7'],
        symptom: 'Zero.\n',
        cause: '',
        workaround: '',
        fix: '',
      })
      .expect(201);
    const isDraft = (m: Mention) => m.projectSlug === slug;
    const anonymous = await t.agent().get('/api/parts/atmega328p').expect(200);
    expect((anonymous.body.mentions as Mention[]).some(isDraft)).toBe(false);
    const owner = await maker.agent.get('/api/parts/atmega328p').expect(200);
    const own = (owner.body.mentions as Mention[]).find(isDraft);
    expect(own).toMatchObject({ kind: 'erratum', pins: ['A7'] });
    const counts = async (agent: ReturnType<TestApp['agent']>) =>
      (await agent.get('/api/parts').expect(200)).body.items.find((p: { slug: string }) => p.slug === 'atmega328p')
        .mentionCount as number;
    expect((await counts(maker.agent)) - (await counts(t.agent()))).toBe(1);
  });

  it('answers 404 for a part that does not exist', async () => {
    const res = await t.agent().get('/api/parts/no-such-part').expect(404);
    expect(res.body.error.code).toBe('not_found');
  });
});

describe('correcting a part (moderators)', () => {
  const body = async (over: Record<string, unknown> = {}) => {
    const page = await t.agent().get('/api/parts/esp32').expect(200);
    return {
      profile: { ...page.body.profile, aliases: [...page.body.profile.aliases, 'ESP32-D0WD'] },
      baseRevision: page.body.revision,
      note: 'Added the chip marking as an alias',
      ...over,
    };
  };

  it('refuses anonymous callers (401) and members who are not moderators (403), changing nothing', async () => {
    const input = await body();
    await t.agent().put('/api/parts/esp32').set({ Origin: t.config.appOrigin }).send(input).expect(401);
    const res = await maker.agent.put('/api/parts/esp32').set(maker.headers).send(input).expect(403);
    expect(res.body.error.code).toBe('forbidden');
    expect((await t.agent().get('/api/parts/esp32')).body.revision).toBe(1);
  });

  it('saves a moderator’s correction as revision 2, which the next seed keeps', async () => {
    const res = await moderator.agent
      .put('/api/parts/esp32')
      .set(moderator.headers)
      .send(await body())
      .expect(200);
    expect(res.body.revision).toBe(2);
    expect(res.body.profile.aliases).toContain('ESP32-D0WD');
    expect(res.body.viewer.canEdit).toBe(true);
    // The tide clock's errata name "ESP32-WROOM", an alias shipped with the profile.
    expect((res.body.mentions as Mention[]).some((m) => m.projectSlug === 'tide-clock')).toBe(true);
    const seeded = await seedParts(t.database.db);
    expect(seeded.kept).toContain('esp32');
    const after = await t.agent().get('/api/parts/esp32').expect(200);
    expect(after.body.revision).toBe(2);
    expect(after.body.profile.aliases).toContain('ESP32-WROOM');
    const history = await t.agent().get('/api/parts/esp32/revisions').expect(200);
    expect(history.body.items.map((r: { number: number }) => r.number)).toEqual([2, 1]);
    expect(history.body.items[0]).toMatchObject({
      note: 'Added the chip marking as an alias',
      author: { handle: 'odile-fenwick' },
    });
    expect(history.body.items[1].author).toBeNull();
  });

  it('answers 409 edit_conflict with the current revision when the correction is based on an old one', async () => {
    const input = await body({ baseRevision: 1, note: 'Stale edit' });
    const res = await moderator.agent.put('/api/parts/esp32').set(moderator.headers).send(input).expect(409);
    expect(res.body.error.code).toBe('edit_conflict');
    expect(res.body.error.details.current.revision).toBe(2);
    const [row] = await t.database.db
      .select({ n: count() })
      .from(revisions)
      .where(and(eq(revisions.subject, 'part'), eq(revisions.message, 'Stale edit')));
    expect(row!.n).toBe(0);
  });

  it('answers 400 for a profile of another part or an invalid profile, and 403 without the CSRF token', async () => {
    const other = await body();
    other.profile = { ...other.profile, slug: 'rp2040' };
    const wrong = await moderator.agent.put('/api/parts/esp32').set(moderator.headers).send(other).expect(400);
    expect(wrong.body.error.code).toBe('validation_failed');
    const invalid = await body();
    invalid.profile = { ...invalid.profile, supply: { ...invalid.profile.supply, minVolts: -1 } };
    const bad = await moderator.agent.put('/api/parts/esp32').set(moderator.headers).send(invalid).expect(400);
    expect(bad.body.error.code).toBe('validation_failed');
    const noCsrf = await moderator.agent
      .put('/api/parts/esp32')
      .set({ Origin: t.config.appOrigin })
      .send(await body())
      .expect(403);
    expect(noCsrf.body.error.code).toBe('csrf_failed');
    expect((await t.agent().get('/api/parts/esp32')).body.revision).toBe(2);
  });
});

describe('adding a part (moderators)', () => {
  const newPart = async () => {
    // A copy of a shipped logic family under a new slug stands in for a moderator's new entry.
    const family = (await t.agent().get('/api/parts/74hct').expect(200)).body.profile;
    return {
      profile: { ...family, slug: '74hct-second-source', name: '74HCT (second source)', aliases: [] },
      note: 'Second-source datasheet',
    };
  };

  it('adds a part as revision 1 authored by the moderator, lists it, and refuses a taken slug with 409', async () => {
    const input = await newPart();
    await maker.agent.post('/api/parts').set(maker.headers).send(input).expect(403);
    const res = await moderator.agent.post('/api/parts').set(moderator.headers).send(input).expect(201);
    expect(res.body).toMatchObject({
      revision: 1,
      profile: { slug: '74hct-second-source', name: '74HCT (second source)' },
    });
    const list = await t.agent().get('/api/parts').expect(200);
    expect(list.body.items.map((p: { slug: string }) => p.slug)).toContain('74hct-second-source');
    const history = await t.agent().get('/api/parts/74hct-second-source/revisions').expect(200);
    expect(history.body.items).toEqual([
      expect.objectContaining({
        number: 1,
        note: 'Second-source datasheet',
        author: expect.objectContaining({ handle: 'odile-fenwick' }),
      }),
    ]);
    const again = await moderator.agent.post('/api/parts').set(moderator.headers).send(input).expect(409);
    expect(again.body.error.code).toBe('conflict');
    const invalid = await newPart();
    invalid.profile = { ...invalid.profile, slug: 'Not A Slug' };
    expect(
      (await moderator.agent.post('/api/parts').set(moderator.headers).send(invalid).expect(400)).body.error.code,
    ).toBe('validation_failed');
  });
});
