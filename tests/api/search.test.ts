import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { indexPending, startSearchIndexer } from '../../api/search/indexer';
import { createTestApp, type SignedInAgent, type TestApp } from '../setup/app';

let t: TestApp;
let owner: SignedInAgent;

beforeAll(async () => {
  t = await createTestApp();
  owner = await t.signIn('ilse-marrow');
  await indexPending(t.ctx);
});
afterAll(async () => {
  await t.close();
});

async function search(query: string, agent = t.agent()) {
  const res = await agent.get(`/api/search?${query}`).expect(200);
  return res.body as {
    items: { kind: string; title: string; url: string; snippetHtml: string; titleHtml: string }[];
    total: { value: number; exact: boolean };
    correctedQuery: string | null;
    suggestions: string[];
    facets: Record<'kind' | 'category' | 'severity' | 'status' | 'tag' | 'part' | 'project', { value: string; count: number }[]>;
  };
}

describe('searching the demo data', () => {
  it('finds an erratum by the pin label in it', async () => {
    const res = await search('q=GPIO35');
    expect(res.items[0]).toMatchObject({ kind: 'erratum', url: expect.stringMatching(/^\/projects\/tide-clock\/errata\/E\d+$/) });
  });

  it('finds a part number from its tail (328p → ATmega328P)', async () => {
    const res = await search('q=328p');
    expect(res.items.length).toBeGreaterThan(0);
    expect(res.items.some((i) => /greenhouse-vent-controller/.test(i.url))).toBe(true);
  });

  it('treats 3.3V and 3V3 as the same word', async () => {
    const a = await search(`q=${encodeURIComponent('3.3V')}`);
    const b = await search('q=3V3');
    expect(a.total.value).toBeGreaterThan(0);
    expect(a.items.map((i) => i.url)).toEqual(b.items.map((i) => i.url));
  });

  it('finds a part of the library by its name or an alias, linking to the part page', async () => {
    const byName = await search('q=ATmega328P&kind=part');
    expect(byName.items.map((i) => i.url)).toEqual(['/parts/atmega328p']);
    const byAlias = await search(`q=${encodeURIComponent('WROOM-32')}&kind=part`);
    expect(byAlias.items.map((i) => i.url)).toContain('/parts/esp32');
    // A pin label still finds the erratum about that pin first, not the part that has the pin.
    expect((await search('q=GPIO35')).items[0]!.kind).toBe('erratum');
  });

  it('corrects a typo when nothing matches (atmaga328 → atmega328…)', async () => {
    const res = await search('q=atmaga328');
    expect(res.correctedQuery).toMatch(/^atmega328/);
    expect(res.items.length).toBeGreaterThan(0);
  });

  it('searches the words as typed with exact=1: no correction, no widening', async () => {
    const res = await search('q=atmaga328&exact=1');
    expect(res.correctedQuery).toBeNull();
    expect(res.items).toEqual([]);
    expect(res.total).toEqual({ value: 0, exact: true });
  });

  it('offers suggestions, not errors, for nonsense', async () => {
    const res = await search('q=zzqxv');
    expect(res.items).toEqual([]);
    expect(res.total).toEqual({ value: 0, exact: true });
  });

  it('highlights matches in HTML-escaped snippets', async () => {
    const res = await search('q=regulator');
    const hit = res.items.find((i) => i.snippetHtml.includes('<mark>'));
    expect(hit).toBeDefined();
    expect(hit!.snippetHtml).not.toMatch(/<(?!\/?mark>)/);
  });

  it('filters to errata and lessons with the known-mistakes shortcut, and by severity', async () => {
    const mistakes = await search('q=pin&mistakes=1');
    expect(new Set(mistakes.items.map((i) => i.kind))).toEqual(new Set(['erratum', 'lesson']));
    const critical = await search('q=pin&severity=critical');
    expect(critical.items.length).toBeGreaterThan(0);
    expect(critical.facets.severity).toEqual([expect.objectContaining({ value: 'critical' })]);
  });

  it('supports phrases, exclusion and OR', async () => {
    const phrase = await search(`q=${encodeURIComponent('"analog input only"')}`);
    expect(phrase.items.length).toBeGreaterThan(0);
    const without = await search(`q=${encodeURIComponent('relay -greenhouse')}`);
    expect(without.items.every((i) => !i.url.includes('greenhouse-vent-controller'))).toBe(true);
    const either = await search(`q=${encodeURIComponent('GPIO35 OR GP14')}`);
    expect(new Set(either.items.map((i) => i.url.split('/')[2]!.split('#')[0]))).toEqual(new Set(['tide-clock', 'bench-supply-monitor']));
  });

  it('counts facets by kind, category and project', async () => {
    const res = await search('q=pin');
    expect(res.facets.kind.length).toBeGreaterThan(1);
    expect(res.facets.project.map((f) => f.value)).toEqual(expect.arrayContaining(['greenhouse-vent-controller']));
  });
});

describe('keeping the index current', () => {
  it('indexes a new erratum through the outbox, and drops it when its project goes back to draft', async () => {
    const project = (await t.agent().get('/api/projects/greenhouse-vent-controller')).body;
    await owner.agent
      .post('/api/projects/greenhouse-vent-controller/errata')
      .set(owner.headers)
      .send({ title: 'Quokka-shaped solder bridge', category: 'footprint-layout', severity: 'minor', status: 'open', affected: [project.boardRevisions[0].id] })
      .expect(201);
    expect((await search('q=quokka')).items).toEqual([]);
    await indexPending(t.ctx);
    expect((await search('q=quokka')).items.map((i) => i.title)).toEqual([expect.stringContaining('Quokka-shaped solder bridge')]);

    await owner.agent.post('/api/projects/greenhouse-vent-controller/unpublish').set(owner.headers).expect(200);
    await indexPending(t.ctx);
    expect((await search('q=quokka')).items).toEqual([]);
    // The owner still finds their draft; nobody else does.
    expect((await search('q=quokka', owner.agent)).items.length).toBe(1);
    const other = await t.signIn('bram-tolliver');
    expect((await search('q=quokka', other.agent)).items).toEqual([]);
    await owner.agent.post('/api/projects/greenhouse-vent-controller/publish').set(owner.headers).expect(200);
    await indexPending(t.ctx);
    expect((await search('q=quokka')).items.length).toBe(1);
  });

  it('finds a change without anyone draining the outbox once the server’s indexer runs', async () => {
    const project = (await t.agent().get('/api/projects/greenhouse-vent-controller')).body;
    const stop = startSearchIndexer(t.ctx, null, 50);
    try {
      await owner.agent
        .post('/api/projects/greenhouse-vent-controller/errata')
        .set(owner.headers)
        .send({ title: 'Numbat-sized ground bounce', category: 'footprint-layout', severity: 'minor', status: 'open', affected: [project.boardRevisions[0].id] })
        .expect(201);
      await expect.poll(async () => (await search('q=numbat')).items.map((i) => i.title), { timeout: 10_000, interval: 100 }).toEqual([
        expect.stringContaining('Numbat-sized ground bounce'),
      ]);
    } finally {
      await stop();
    }
  });

  it('treats a tag alias as a synonym of the tag', async () => {
    const tagged = await t.ctx.db.execute<{ erratum_id: number; tag_id: number; title: string }>(sql`
      SELECT et.erratum_id, et.tag_id, e.title FROM erratum_tags et
      JOIN errata e ON e.id = et.erratum_id JOIN projects p ON p.id = e.project_id
      WHERE p.status = 'published' AND p.deleted_at IS NULL AND e.hidden_at IS NULL ORDER BY e.id LIMIT 1`);
    const row = tagged.rows[0]!;
    expect((await search('q=kookaburra')).items).toEqual([]);
    await t.ctx.db.execute(sql`INSERT INTO tag_aliases (alias, tag_id) VALUES ('kookaburra-wiring', ${row.tag_id})`);
    await t.ctx.db.execute(sql`INSERT INTO search_outbox (kind, ref_id) VALUES ('erratum', ${row.erratum_id})`);
    await indexPending(t.ctx);
    const found = (await search('q=kookaburra')).items.filter((i) => i.kind === 'erratum');
    expect(found.map((i) => i.title)).toEqual([expect.stringMatching(new RegExp(`^E\\d+ ${row.title.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}$`))]);
  });

  it('leaves nothing in the outbox after indexing', async () => {
    await indexPending(t.ctx);
    const left = await t.ctx.db.execute(sql`SELECT count(*)::int AS n FROM search_outbox`);
    expect(left.rows[0]).toEqual({ n: 0 });
  });
});
