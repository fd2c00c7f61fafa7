import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ANONYMOUS } from '../../api/search/backend';
import type { SearchDocument } from '../../api/search/documents';
import { indexPending, startSearchIndexer } from '../../api/search/indexer';
import { chooseStrategy, PostgresSearch, RUM_INDEX, searchStatement } from '../../api/search/postgres';
import { searchQuerySchema } from '../../shared/contracts/search';
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

describe('finding the newest matches: the walk and the RUM scan', () => {
  // Thirty items that share one made-up word, each a day newer than the last.
  const docs = (): SearchDocument[] =>
    Array.from({ length: 30 }, (_, i) => ({
      kind: 'log_entry',
      refId: 900_000 + i,
      projectId: null,
      visible: true,
      title: `Bench note ${i}`,
      body: `Tuesday: the wombatic relay chattered again (${i}).`,
      url: `/notes/${i}`,
      projectSlug: null,
      projectTitle: null,
      category: null,
      severity: null,
      status: null,
      tags: [],
      parts: [],
      pins: [],
      updatedAt: new Date(Date.UTC(2026, 0, 1 + i)),
      weighted: { a: `Bench note ${i}`, b: '', c: '', d: `Tuesday: the wombatic relay chattered again (${i}).` },
      codes: { a: [], c: [] },
    }));
  const refs = docs().map((d) => ({ kind: d.kind, refId: d.refId }));

  beforeAll(async () => {
    await new PostgresSearch(t.ctx.db).upsert(docs());
  });
  afterAll(async () => {
    await new PostgresSearch(t.ctx.db).remove(refs);
  });

  it('has the RUM index in the test database (the extension is installed by .ci/run)', async () => {
    const found = await t.ctx.db.execute(sql`SELECT 1 FROM pg_indexes WHERE indexname = ${RUM_INDEX}`);
    expect(found.rows.length).toBe(1);
  });

  it('walks for a word in nearly every item and scans RUM for a word in a few', () => {
    // 100,000 items, 400 candidates: the walk wins from about 35,800 estimated matches.
    expect(chooseStrategy(100_000, 100_000)).toBe('walk');
    expect(chooseStrategy(40_000, 100_000)).toBe('walk');
    expect(chooseStrategy(30_000, 100_000)).toBe('rum');
    expect(chooseStrategy(12, 100_000)).toBe('rum');
    // A small table never walks: the RUM scan of every match is cheap there.
    expect(chooseStrategy(2_000, 2_000)).toBe('rum');
  });

  it('takes the same newest candidates either way, newest first', async () => {
    const query = searchQuerySchema.parse({ q: 'wombatic', pageSize: '10' });
    const bounds = { candidates: 5, titleCandidates: 5 };
    const newest = [29, 28, 27, 26, 25].map((i) => `/notes/${i}`);
    for (const strategy of ['walk', 'rum'] as const) {
      const { rows } = await t.ctx.db.execute<{ total: number; items: { url: string }[] }>(
        searchStatement(query, ANONYMOUS, query.q, strategy, bounds),
      );
      expect(rows[0]!.total).toBe(5);
      expect(new Set(rows[0]!.items.map((i) => i.url))).toEqual(new Set(newest));
    }
  });

  it('answers the same through either strategy over the demo data', async () => {
    for (const q of ['relay', 'GPIO35', 'regulator hot', '"analog input only"', 'relay -greenhouse', 'GPIO35 OR GP14']) {
      const query = searchQuerySchema.parse({ q });
      const answers = [];
      for (const strategy of ['walk', 'rum'] as const) {
        const { rows } = await t.ctx.db.execute<{ total: number; items: { url: string }[] }>(
          searchStatement(query, ANONYMOUS, q, strategy),
        );
        answers.push({ total: rows[0]!.total, urls: rows[0]!.items.map((i) => i.url) });
      }
      expect(answers[0]!.total, q).toBeGreaterThan(0);
      expect(answers[1], q).toEqual(answers[0]);
    }
  });

  it('keeps an exclusion when only the title matches the other words', async () => {
    // "Bench note" is in the titles; the excluded word only in the bodies.
    const res = await search(`q=${encodeURIComponent('bench note -wombatic')}`);
    expect(res.items.filter((i) => i.url.startsWith('/notes/'))).toEqual([]);
    const kept = await search(`q=${encodeURIComponent('bench note')}`);
    expect(kept.items.some((i) => i.url.startsWith('/notes/'))).toBe(true);
  });
});

describe('the search budget', () => {
  it('answers 429 with Retry-After once a client has spent its searches for the minute', async () => {
    const limited = await createTestApp({ env: { SEARCH_RATE_PER_MINUTE: '3' } });
    try {
      const agent = limited.agent();
      for (let i = 0; i < 3; i++) await agent.get('/api/search?q=relay').expect(200);
      const refused = await agent.get('/api/search?q=relay').expect(429);
      expect(refused.body.error.code).toBe('rate_limited');
      expect(Number(refused.headers['retry-after'])).toBeGreaterThan(0);
      // Another budget is untouched: the same client still reads a project.
      await agent.get('/api/projects/tide-clock').expect(200);
    } finally {
      await limited.close();
    }
  });
});
