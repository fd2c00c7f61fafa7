import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, type SignedInAgent, type TestApp } from '../setup/app';

let t: TestApp;
let maker: SignedInAgent;
let editor: SignedInAgent;
let contributor: SignedInAgent;
let slug: string;
let revA: number;
let revB: number;
let foreignBoard: number;

interface PinMap {
  id: number;
  boardRevision: { id: number; label: string };
  part: { slug: string };
  revision: number;
  rows: { pin: string; signal: string; function: string }[];
}

beforeAll(async () => {
  t = await createTestApp();
  maker = await t.signIn('ilse-marrow');
  editor = await t.signIn('juniper-okoye');
  contributor = await t.signIn('bram-tolliver');
  const project = await maker.agent
    .post('/api/projects')
    .set(maker.headers)
    .send({ title: 'Pin Map Bench', summary: '', licence: 'MIT', hazards: [] })
    .expect(201);
  slug = project.body.slug;
  await maker.agent.post(`/api/projects/${slug}/publish`).set(maker.headers).expect(200);
  const board = async (s: string, label: string) =>
    (await maker.agent.post(`/api/projects/${s}/board-revisions`).set(maker.headers).send({ label }).expect(201)).body
      .id as number;
  revA = await board(slug, 'Rev A');
  revB = await board(slug, 'Rev B');
  const other = await maker.agent
    .post('/api/projects')
    .set(maker.headers)
    .send({ title: 'Other Pin Bench', summary: '', licence: 'MIT', hazards: [] })
    .expect(201);
  foreignBoard = await board(other.body.slug, 'Rev X');
});
afterAll(async () => {
  await t.close();
});

const rows = [
  { pin: 'D9', signal: 'Actuator IN1', function: 'pwm' },
  { pin: 'A6', signal: 'Relay module IN', function: 'digital_out' },
];

const list = async () => (await t.agent().get(`/api/projects/${slug}/pin-maps`).expect(200)).body.items as PinMap[];

describe('demo pin maps', () => {
  it('checks the greenhouse Rev A map: the relay on A6 is analog input only, citing the datasheet pin description', async () => {
    const maps = (await t.agent().get('/api/projects/greenhouse-vent-controller/pin-maps').expect(200)).body
      .items as PinMap[];
    expect(maps.map((m) => m.boardRevision.label)).toEqual(['Rev A', 'Rev B']);
    const revAMap = maps.find((m) => m.boardRevision.label === 'Rev A')!;
    const res = await t
      .agent()
      .get(`/api/projects/greenhouse-vent-controller/pin-maps/${revAMap.id}/check`)
      .expect(200);
    expect(res.body.supplyVolts).toBe(5);
    expect(res.body.findings).toHaveLength(1);
    const [finding] = res.body.findings;
    expect(finding).toMatchObject({ severity: 'error', code: 'analog_only' });
    expect(finding.pin).toContain('A6');
    // Microchip ATmega328/P datasheet DS40001984A, pin descriptions: ADC7:6 are analog inputs only (TQFP, QFN/MLF).
    expect(finding.source.document).toContain('ATmega328/P');
    expect(finding.source.revision).toContain('DS40001984A');
    expect(finding.source.section).toContain('ADC7:6');
    const revBMap = maps.find((m) => m.boardRevision.label === 'Rev B')!;
    const clean = await t
      .agent()
      .get(`/api/projects/greenhouse-vent-controller/pin-maps/${revBMap.id}/check`)
      .expect(200);
    expect(clean.body.findings).toEqual([]);
    // The bench supply monitor's RP2040 map checks clean: the 5 V input arrives through its divider at 3.0 V.
    const [benchMap] = (await t.agent().get('/api/projects/bench-supply-monitor/pin-maps').expect(200)).body
      .items as PinMap[];
    const bench = await t.agent().get(`/api/projects/bench-supply-monitor/pin-maps/${benchMap!.id}/check`).expect(200);
    expect(bench.body).toMatchObject({ supplyVolts: 3.3, findings: [] });
  });

  it('lets an editor of the project save a demo map, and tells readers whether they can edit', async () => {
    const res = await editor.agent.get('/api/projects/greenhouse-vent-controller/pin-maps').expect(200);
    expect(res.body.viewer.canEdit).toBe(true);
    expect((await t.agent().get('/api/projects/greenhouse-vent-controller/pin-maps')).body.viewer.canEdit).toBe(false);
    const map = (res.body.items as PinMap[])[1]!;
    const saved = await editor.agent
      .put(`/api/projects/greenhouse-vent-controller/pin-maps/${map.id}`)
      .set(editor.headers)
      .send({
        supplyVolts: 5,
        rows: [...map.rows, { pin: 'D3', signal: 'Spare', function: 'digital_in' }],
        baseRevision: 1,
      })
      .expect(200);
    expect(saved.body.revision).toBe(2);
  });
});

describe('pin map CRUD', () => {
  it('creates a map for a board revision and part of the project (201) and checks it', async () => {
    const res = await maker.agent
      .post(`/api/projects/${slug}/pin-maps`)
      .set(maker.headers)
      .send({ boardRevisionId: revA, partSlug: 'atmega328p', rows })
      .expect(201);
    expect(res.body).toMatchObject({
      boardRevision: { id: revA, label: 'Rev A' },
      part: { slug: 'atmega328p' },
      revision: 1,
      supplyVolts: null,
    });
    const check = await t.agent().get(`/api/projects/${slug}/pin-maps/${res.body.id}/check`).expect(200);
    // No supply given: the ATmega328P's nominal 5 V.
    expect(check.body.supplyVolts).toBe(5);
    expect(check.body.findings.map((f: { code: string; rowIndexes: number[] }) => [f.code, f.rowIndexes])).toEqual([
      ['analog_only', [1]],
    ]);
  });

  it('answers 409 pin_map_exists for a second map of the same part on the same board, saving nothing', async () => {
    const res = await maker.agent
      .post(`/api/projects/${slug}/pin-maps`)
      .set(maker.headers)
      .send({ boardRevisionId: revA, partSlug: 'atmega328p', rows: [] })
      .expect(409);
    expect(res.body.error.code).toBe('pin_map_exists');
    expect(res.body.error.message).toMatch(/Rev A/);
    expect(await list()).toHaveLength(1);
  });

  it('answers 400 for a board revision of another project or an unknown part, saving nothing', async () => {
    const wrongBoard = await maker.agent
      .post(`/api/projects/${slug}/pin-maps`)
      .set(maker.headers)
      .send({ boardRevisionId: foreignBoard, partSlug: 'atmega328p', rows })
      .expect(400);
    expect(wrongBoard.body.error.code).toBe('validation_failed');
    expect(wrongBoard.body.error.details.issues).toEqual([
      { path: 'boardRevisionId', message: 'not a board revision of this project' },
    ]);
    const wrongPart = await maker.agent
      .post(`/api/projects/${slug}/pin-maps`)
      .set(maker.headers)
      .send({ boardRevisionId: revB, partSlug: 'no-such-part', rows })
      .expect(400);
    expect(wrongPart.body.error.details.issues[0].path).toBe('partSlug');
    const badRow = await maker.agent
      .post(`/api/projects/${slug}/pin-maps`)
      .set(maker.headers)
      .send({ boardRevisionId: revB, partSlug: 'atmega328p', rows: [{ pin: 'D2', signal: 'x', function: 'teleport' }] })
      .expect(400);
    expect(badRow.body.error.code).toBe('validation_failed');
    expect(await list()).toHaveLength(1);
  });

  it('refuses anonymous callers (401), members who are not editors (403) and requests without the CSRF token (403)', async () => {
    const body = { boardRevisionId: revB, partSlug: 'atmega328p', rows };
    const anon = await t
      .agent()
      .post(`/api/projects/${slug}/pin-maps`)
      .set({ Origin: t.config.appOrigin })
      .send(body)
      .expect(401);
    expect(anon.body.error.code).toBe('unauthenticated');
    const member = await contributor.agent
      .post(`/api/projects/${slug}/pin-maps`)
      .set(contributor.headers)
      .send(body)
      .expect(403);
    expect(member.body.error.code).toBe('forbidden');
    const noCsrf = await maker.agent
      .post(`/api/projects/${slug}/pin-maps`)
      .set({ Origin: t.config.appOrigin })
      .send(body)
      .expect(403);
    expect(noCsrf.body.error.code).toBe('csrf_failed');
    const [map] = await list();
    await contributor.agent.delete(`/api/projects/${slug}/pin-maps/${map!.id}`).set(contributor.headers).expect(403);
    expect(await list()).toHaveLength(1);
  });

  it('saves with the current baseRevision as the next revision and answers 409 edit_conflict for an old one', async () => {
    const [map] = await list();
    const moved = [rows[0]!, { pin: 'D7', signal: 'Relay module IN', function: 'digital_out' }];
    const saved = await maker.agent
      .put(`/api/projects/${slug}/pin-maps/${map!.id}`)
      .set(maker.headers)
      .send({ supplyVolts: 5, rows: moved, baseRevision: 1 })
      .expect(200);
    expect(saved.body).toMatchObject({ revision: 2, supplyVolts: 5 });
    expect(saved.body.rows[1].pin).toBe('D7');
    const check = await t.agent().get(`/api/projects/${slug}/pin-maps/${map!.id}/check`).expect(200);
    expect(check.body.findings).toEqual([]);
    const stale = await maker.agent
      .put(`/api/projects/${slug}/pin-maps/${map!.id}`)
      .set(maker.headers)
      .send({ supplyVolts: 3.3, rows, baseRevision: 1 })
      .expect(409);
    expect(stale.body.error.code).toBe('edit_conflict');
    expect(stale.body.error.details.current.revision).toBe(2);
    expect((await list())[0]).toMatchObject({ revision: 2 });
  });

  it('deletes a map (204); it is then gone from the list and its check answers 404', async () => {
    const [map] = await list();
    await maker.agent.delete(`/api/projects/${slug}/pin-maps/${map!.id}`).set(maker.headers).expect(204);
    expect(await list()).toEqual([]);
    const res = await t.agent().get(`/api/projects/${slug}/pin-maps/${map!.id}/check`).expect(404);
    expect(res.body.error.code).toBe('not_found');
  });
});
