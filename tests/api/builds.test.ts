import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, type SignedInAgent, type TestApp } from '../setup/app';

let t: TestApp;
let maker: SignedInAgent;
let contributor: SignedInAgent;
let slug: string;

interface Build {
  id: number;
  label: string;
  flashUsed: number;
  ramUsed: number;
  flashAvailable: number;
  ramAvailable: number;
  flashDelta: number | null;
  ramDelta: number | null;
  warnings: { flash: boolean; ram: boolean };
  rule: string;
}

beforeAll(async () => {
  t = await createTestApp();
  maker = await t.signIn('ilse-marrow');
  contributor = await t.signIn('bram-tolliver');
  const project = await maker.agent
    .post('/api/projects')
    .set(maker.headers)
    .send({ title: 'Budget Bench', summary: '', licence: 'MIT', hazards: [] })
    .expect(201);
  slug = project.body.slug;
  await maker.agent.post(`/api/projects/${slug}/publish`).set(maker.headers).expect(200);
});
afterAll(async () => {
  await t.close();
});

// Berkeley format (GNU Binutils "size" default): dec = text + data + bss, hex = dec in hex.
const berkeley = `   text    data     bss     dec     hex filename
  21236     280    1190   22706    58b2 vent.elf
`;

// SysV format (size -A): one row per section; Total also counts .comment, which is not loaded.
const sysv = `vent.elf  :
section                     size      addr
.data                        300   8388864
.text                      22000         0
.bss                        1200   8389164
.comment                      17         0
.note.gnu.avr.deviceinfo      64         0
Total                      23581
`;

const list = async () => (await t.agent().get(`/api/projects/${slug}/builds`).expect(200)).body;

const post = (body: Record<string, unknown>, agent = maker) =>
  agent.agent
    .post(`/api/projects/${slug}/builds`)
    .set(agent.headers)
    .send({ partSlug: 'atmega328p', ...body });

describe('firmware builds', () => {
  it('counts flash as .text + .data and RAM as .data + .bss on AVR (avr-libc User Manual, "Memory Sections")', async () => {
    const res = await post({ label: 'v1', builtOn: '2026-05-01', reportText: berkeley }).expect(201);
    // 21236 + 280 and 280 + 1190, against the ATmega328P's 32 KB flash and 2 KB SRAM (datasheet).
    expect(res.body).toMatchObject({
      label: 'v1',
      reportFormat: 'berkeley',
      flashUsed: 21_516,
      ramUsed: 1_470,
      flashAvailable: 32_768,
      ramAvailable: 2_048,
      flashDelta: null,
      ramDelta: null,
      part: { slug: 'atmega328p' },
    });
    expect(res.body.rule).toMatch(/avr-libc/);
    expect(res.body.ramPercent).toBeCloseTo((1470 / 2048) * 100, 1);
  });

  it('reads a SysV report and answers the change against the previous build', async () => {
    const res = await post({
      label: 'v2',
      builtOn: '2026-05-20',
      changeNote: 'More menu text',
      reportText: sysv,
      bootloaderBytes: 512,
    }).expect(201);
    // .comment and .note.* are not loaded: flash 22000 + 300, RAM 300 + 1200; 32768 − 512 left for firmware.
    expect(res.body).toMatchObject({ reportFormat: 'sysv', flashUsed: 22_300, ramUsed: 1_500, flashAvailable: 32_256 });
    expect(res.body.flashDelta).toBe(22_300 - 21_516);
    expect(res.body.ramDelta).toBe(1_500 - 1_470);
  });

  it('orders builds by build date, then by id, and works out deltas in that order', async () => {
    await post({
      label: 'v0',
      builtOn: '2026-04-01',
      reportText: berkeley.replace('21236', '20236').replace('22706    58b2', '21706    54ca'),
    }).expect(201);
    const body = await list();
    expect(body.items.map((b: Build) => b.label)).toEqual(['v0', 'v1', 'v2']);
    expect(body.items.map((b: Build) => b.flashDelta)).toEqual([null, 1_000, 784]);
    expect(body.warnAtPercent).toBe(90);
  });

  it('answers 400 size_report_invalid with the reason for a report that is not a size report or does not add up, saving nothing', async () => {
    const before = (await list()).items.length;
    const notAReport = await post({
      label: 'bad',
      reportText: 'Sketch uses 21516 bytes (70%) of program storage space.',
    }).expect(400);
    expect(notAReport.body.error.code).toBe('size_report_invalid');
    expect(notAReport.body.error.message).toMatch(/not a binutils size report/);
    const wrongSum = await post({ label: 'bad', reportText: berkeley.replace('22706', '22707') }).expect(400);
    expect(wrongSum.body.error.code).toBe('size_report_invalid');
    expect(wrongSum.body.error.message).toMatch(/text \+ data \+ bss = 22706/);
    const empty = await post({ label: 'bad', reportText: '' }).expect(400);
    expect(empty.body.error.code).toBe('validation_failed');
    expect((await list()).items.length).toBe(before);
  });

  it('marks RAM as a warning once the threshold is at or below its share, and refuses a threshold outside 50–100', async () => {
    // v2 uses 1500 of 2048 bytes of RAM (73.2 %) and 22300 of 32256 bytes of flash (69.1 %).
    const low = await maker.agent
      .put(`/api/projects/${slug}/builds/settings`)
      .set(maker.headers)
      .send({ warnAtPercent: 70 })
      .expect(200);
    expect(low.body.warnAtPercent).toBe(70);
    const v2 = (items: Build[]) => items.find((b) => b.label === 'v2')!;
    expect(v2(low.body.items).warnings).toEqual({ flash: false, ram: true });
    const high = await maker.agent
      .put(`/api/projects/${slug}/builds/settings`)
      .set(maker.headers)
      .send({ warnAtPercent: 90 })
      .expect(200);
    expect(v2(high.body.items).warnings).toEqual({ flash: false, ram: false });
    const bad = await maker.agent
      .put(`/api/projects/${slug}/builds/settings`)
      .set(maker.headers)
      .send({ warnAtPercent: 40 })
      .expect(400);
    expect(bad.body.error.code).toBe('validation_failed');
    expect((await list()).warnAtPercent).toBe(90);
  });

  it('refuses members who are not editors (403), anonymous callers (401) and requests without the CSRF token', async () => {
    const before = (await list()).items.length;
    await post({ label: 'x', reportText: berkeley }, contributor).expect(403);
    await t
      .agent()
      .post(`/api/projects/${slug}/builds`)
      .set({ Origin: t.config.appOrigin })
      .send({ label: 'x', partSlug: 'atmega328p', reportText: berkeley })
      .expect(401);
    const noCsrf = await maker.agent
      .post(`/api/projects/${slug}/builds`)
      .set({ Origin: t.config.appOrigin })
      .send({ label: 'x', partSlug: 'atmega328p', reportText: berkeley })
      .expect(403);
    expect(noCsrf.body.error.code).toBe('csrf_failed');
    await contributor.agent
      .put(`/api/projects/${slug}/builds/settings`)
      .set(contributor.headers)
      .send({ warnAtPercent: 60 })
      .expect(403);
    expect((await list()).items.length).toBe(before);
  });

  it('deletes a build (204) and the next one is then compared with the one before it', async () => {
    const v1 = (await list()).items.find((b: Build) => b.label === 'v1') as Build;
    await maker.agent.delete(`/api/projects/${slug}/builds/${v1.id}`).set(maker.headers).expect(204);
    const body = await list();
    expect(body.items.map((b: Build) => b.label)).toEqual(['v0', 'v2']);
    expect(body.items[1].flashDelta).toBe(22_300 - 20_516);
    await maker.agent.delete(`/api/projects/${slug}/builds/${v1.id}`).set(maker.headers).expect(404);
  });
});

describe('demo builds', () => {
  it('show the greenhouse ledger oldest first: moving strings to flash saved 326 bytes of RAM', async () => {
    const body = (await t.agent().get('/api/projects/greenhouse-vent-controller/builds').expect(200)).body;
    expect(body.items).toHaveLength(4);
    const dates = body.items.map((b: { builtOn: string }) => b.builtOn);
    expect([...dates].sort()).toEqual(dates);
    expect(body.items[1].ramDelta).toBe(-326);
    expect(body.viewer.canEdit).toBe(false);
  });
});
