/**
 * One contract for both search backends: the same behaviours through the real app and HTTP,
 * once with PostgreSQL full-text answering and once with Meilisearch (the local fake on
 * loopback, fed by the indexer as the secondary backend, exactly as the server wires it).
 * Expected values come from the demo data and the project pages, never from a backend's answer
 * to the same question.
 */
import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startFakeMeilisearch } from '../../api/fakes/meilisearch';
import type { SearchBackend } from '../../api/search/backend';
import { indexPending } from '../../api/search/indexer';
import { MeilisearchSearch } from '../../api/search/meilisearch';
import { reindexEverything } from '../../api/search/reindex';
import type { Erratum } from '../../shared/contracts/errata';
import type { SearchResult } from '../../shared/contracts/search';
import { createTestApp, type SignedInAgent, type TestApp } from '../setup/app';

interface Attached {
  /** What the indexer feeds besides PostgreSQL's own index. */
  secondary: SearchBackend | null;
  /** Where the Meilisearch fake listens, for the Meilisearch run. */
  meilisearchUrl?: string;
  close(): Promise<void>;
}

interface Backend {
  attach(t: TestApp): Promise<Attached>;
  /** PostgreSQL corrects a typo when nothing matched; Meilisearch's typo tolerance finds it by itself. */
  reportsCorrection: boolean;
}

const backends: Array<[string, Backend]> = [
  ['postgres', { reportsCorrection: true, attach: async () => ({ secondary: null, close: async () => {} }) }],
  [
    'meilisearch',
    {
      reportsCorrection: false,
      attach: async (t) => {
        const apiKey = 'contract-test-key';
        const fake = await startFakeMeilisearch({ port: 0, apiKey });
        const backend = new MeilisearchSearch({ url: fake.url, apiKey });
        // Before the first search: searchBackendOf(ctx) picks it up from here.
        t.ctx.searchBackend = backend;
        return { secondary: backend, meilisearchUrl: fake.url, close: () => fake.close() };
      },
    },
  ],
];

const TAG = /<\/?([a-z]+)[^>]*>/gi;
const tagsIn = (html: string) => [...html.matchAll(TAG)].map((m) => m[1]!.toLowerCase());
const projectOf = (url: string) => url.split('/')[2]!.split('#')[0]!;

describe.each(backends)('search contract: %s', (name, backend) => {
  let t: TestApp;
  let attached: Attached;
  let owner: SignedInAgent;
  let member: SignedInAgent;
  let admin: SignedInAgent;
  const index = () => indexPending(t.ctx, { secondary: attached.secondary });

  beforeAll(async () => {
    t = await createTestApp();
    attached = await backend.attach(t);
    owner = await t.signIn('ilse-marrow');
    member = await t.signIn('bram-tolliver');
    admin = await t.signIn('quill-haverford');
    await index();
  });
  afterAll(async () => {
    await attached?.close();
    await t?.close();
  });

  async function search(params: Record<string, string | number | string[]>, agent = t.agent()): Promise<SearchResult> {
    const query = new URLSearchParams();
    for (const [key, value] of Object.entries(params))
      for (const v of ([] as Array<string | number>).concat(value)) query.append(key, String(v));
    const res = await agent.get(`/api/search?${query}`).expect(200);
    expect(res.body.backend).toBe(name);
    return res.body as SearchResult;
  }

  const erratumIn = (res: SearchResult, part: string) =>
    res.items.filter((i) => i.kind === 'erratum' && i.parts.includes(part));

  describe('finding things by what makers type', () => {
    it('finds errata by an exact part number (ATmega328P)', async () => {
      const res = await search({ q: 'ATmega328P' });
      expect(erratumIn(res, 'ATmega328P').length).toBeGreaterThan(0);
      expect(res.items.every((i) => !i.project || projectOf(i.url) === i.project.slug)).toBe(true);
    });

    it('finds a part number from its tail (328p → ATmega328P)', async () => {
      const res = await search({ q: '328p' });
      expect(res.items.some((i) => projectOf(i.url) === 'greenhouse-vent-controller')).toBe(true);
      expect(erratumIn(res, 'ATmega328P').length).toBeGreaterThan(0);
    });

    it('puts the erratum about a pin label first (GPIO35)', async () => {
      const res = await search({ q: 'GPIO35' });
      expect(res.items[0]).toMatchObject({
        kind: 'erratum',
        url: expect.stringMatching(/^\/projects\/tide-clock\/errata\/E\d+$/),
      });
      expect(res.items[0]!.pins).toContain('GPIO35');
    });

    it('treats 3.3V, 3,3 V and 3V3 as the same voltage', async () => {
      const a = await search({ q: '3.3V' });
      const b = await search({ q: '3V3' });
      const c = await search({ q: '3,3 V' });
      expect(a.total.value).toBeGreaterThan(0);
      expect(b.items.map((i) => i.url)).toEqual(a.items.map((i) => i.url));
      expect(c.items.map((i) => i.url)).toEqual(a.items.map((i) => i.url));
    });

    it('finds ATmega328P errata despite a typo (atmaga328)', async () => {
      const res = await search({ q: 'atmaga328' });
      expect(erratumIn(res, 'ATmega328P').length).toBeGreaterThan(0);
      if (backend.reportsCorrection) expect(res.correctedQuery).toMatch(/^atmega328/);
      else expect(res.correctedQuery).toBeNull();
    });

    it('answers nonsense with nothing, not an error', async () => {
      const res = await search({ q: 'zzqxv' });
      expect(res.items).toEqual([]);
      expect(res.total).toEqual({ value: 0, exact: true });
    });

    it('supports phrases, exclusion and OR', async () => {
      expect((await search({ q: '"analog input only"' })).items.length).toBeGreaterThan(0);
      const without = await search({ q: 'relay -greenhouse' });
      expect(without.items.length).toBeGreaterThan(0);
      expect(without.items.every((i) => projectOf(i.url) !== 'greenhouse-vent-controller')).toBe(true);
      const either = await search({ q: 'GPIO35 OR GP14' });
      expect(new Set(either.items.map((i) => projectOf(i.url)))).toEqual(
        new Set(['tide-clock', 'bench-supply-monitor']),
      );
      const gpio = await search({ q: 'GPIO35', pageSize: 50 });
      const gp = await search({ q: 'GP14', pageSize: 50 });
      // Everything either side finds, once each.
      const union = new Set([...gpio.items, ...gp.items].map((i) => `${i.kind}:${i.id}`));
      expect(either.total.value).toBe(union.size);
    });
  });

  describe('filters and facets', () => {
    it('lists facet values with counts, most frequent first, covering every result', async () => {
      const res = await search({ q: 'pin', pageSize: 50 });
      expect(res.facets.kind.length).toBeGreaterThan(1);
      for (const facet of Object.values(res.facets)) {
        const counts = facet.map((f) => f.count);
        expect(counts).toEqual([...counts].sort((a, b) => b - a));
        expect(counts.every((c) => c > 0)).toBe(true);
      }
      expect(res.facets.kind.reduce((sum, f) => sum + f.count, 0)).toBe(res.total.value);
      expect(res.facets.kind.find((f) => f.value === 'erratum')?.label).toBe('Errata');
      const greenhouse = (await t.agent().get('/api/projects/greenhouse-vent-controller').expect(200)).body as {
        title: string;
      };
      expect(res.facets.project).toContainEqual(
        expect.objectContaining({ value: 'greenhouse-vent-controller', label: greenhouse.title }),
      );
    });

    it.each(['kind', 'category', 'severity', 'tag', 'project'] as const)(
      'a %s filter narrows to exactly the count its facet showed',
      async (facet) => {
        const all = await search({ q: 'pin', pageSize: 50 });
        const top = all.facets[facet][0];
        expect(top, `the ${facet} facet has values`).toBeDefined();
        const narrowed = await search({ q: 'pin', pageSize: 50, [facet]: top!.value });
        expect(narrowed.total.value).toBe(top!.count);
        // Items carry several tags; every other facet has one value per item.
        if (facet === 'tag')
          expect(narrowed.facets.tag).toContainEqual(expect.objectContaining({ value: top!.value, count: top!.count }));
        else
          expect(narrowed.facets[facet]).toEqual([expect.objectContaining({ value: top!.value, count: top!.count })]);
        const value = (i: SearchResult['items'][number]) =>
          facet === 'tag' ? i.tags : facet === 'project' ? [i.project?.slug] : [facet === 'kind' ? i.kind : i[facet]];
        expect(narrowed.items.every((i) => value(i).includes(top!.value))).toBe(true);
        // The other facets count the narrowed set, not everything.
        expect(narrowed.facets.kind.reduce((sum, f) => sum + f.count, 0)).toBe(narrowed.total.value);
      },
    );

    it('the known-mistakes shortcut keeps errata and lessons only', async () => {
      const all = await search({ q: 'pin', pageSize: 50 });
      const mistakes = await search({ q: 'pin', mistakes: '1', pageSize: 50 });
      expect(new Set(mistakes.items.map((i) => i.kind))).toEqual(new Set(['erratum', 'lesson']));
      const expected = all.facets.kind
        .filter((f) => f.value === 'erratum' || f.value === 'lesson')
        .reduce((sum, f) => sum + f.count, 0);
      expect(mistakes.total.value).toBe(expected);
    });

    it('browses a project’s errata without words: exactly the ones its page lists, with severity counts', async () => {
      const list = (await t.agent().get('/api/projects/tide-clock/errata').expect(200)).body as { items: Erratum[] };
      const res = await search({ kind: 'erratum', project: 'tide-clock', pageSize: 50 });
      expect(res.items.map((i) => i.title).sort()).toEqual(list.items.map((e) => `${e.code} ${e.title}`).sort());
      expect(res.total).toEqual({ value: list.items.length, exact: true });
      const bySeverity = new Map<string, number>();
      for (const e of list.items) bySeverity.set(e.severity, (bySeverity.get(e.severity) ?? 0) + 1);
      expect(new Map(res.facets.severity.map((f) => [f.value, f.count]))).toEqual(bySeverity);
      expect(res.items.every((i) => i.snippetHtml === '' && !i.titleHtml.includes('<mark>'))).toBe(true);
    });
  });

  describe('snippets and pages', () => {
    it('marks matches in snippets and titles with <mark> and no other tags', async () => {
      for (const q of ['regulator', 'GPIO35', 'relay pin']) {
        const res = await search({ q });
        expect(res.items.some((i) => i.snippetHtml.includes('<mark>') || i.titleHtml.includes('<mark>'))).toBe(true);
        for (const item of res.items) {
          expect(new Set([...tagsIn(item.snippetHtml), ...tagsIn(item.titleHtml)]).size <= 1).toBe(true);
          expect([...tagsIn(item.snippetHtml), ...tagsIn(item.titleHtml)].every((tag) => tag === 'mark')).toBe(true);
        }
      }
      const regulator = await search({ q: 'regulator' });
      expect(regulator.items.some((i) => /<mark>regulator<\/mark>/i.test(i.snippetHtml))).toBe(true);
    });

    it('escapes what authors typed around the marks', async () => {
      const project = (await t.agent().get('/api/projects/greenhouse-vent-controller')).body;
      await owner.agent
        .post('/api/projects/greenhouse-vent-controller/errata')
        .set(owner.headers)
        .send({
          title: 'Wallaby <b>header</b> & "keyed" plug',
          category: 'footprint-layout',
          severity: 'minor',
          status: 'open',
          affected: [project.boardRevisions[0].id],
        })
        .expect(201);
      await index();
      const [hit] = (await search({ q: 'wallaby' })).items;
      expect(hit?.titleHtml).toMatch(/<mark>Wallaby<\/mark> &lt;b&gt;header&lt;\/b&gt; &amp; &quot;keyed&quot; plug$/);
    });

    it('pages through results without gaps or repeats', async () => {
      const first = await search({ q: 'pin', pageSize: 3, page: 1 });
      const second = await search({ q: 'pin', pageSize: 3, page: 2 });
      const both = await search({ q: 'pin', pageSize: 6, page: 1 });
      expect(first).toMatchObject({ page: 1, pageSize: 3 });
      expect(second).toMatchObject({ page: 2, pageSize: 3 });
      expect(first.items).toHaveLength(3);
      expect(second.items).toHaveLength(3);
      const key = (i: SearchResult['items'][number]) => `${i.kind}:${i.id}`;
      expect([...first.items, ...second.items].map(key)).toEqual(both.items.map(key));
      expect(second.total.value).toBe(first.total.value);
      const far = await search({ q: 'pin', pageSize: 50, page: 50 });
      expect(far.items).toEqual([]);
    });
  });

  describe('keeping the index current and private', () => {
    it('drops an erratum when its project goes back to draft, except for the owner and admins', async () => {
      const project = (await t.agent().get('/api/projects/greenhouse-vent-controller')).body;
      await owner.agent
        .post('/api/projects/greenhouse-vent-controller/errata')
        .set(owner.headers)
        .send({
          title: 'Quokka-shaped solder bridge',
          category: 'footprint-layout',
          severity: 'minor',
          status: 'open',
          affected: [project.boardRevisions[0].id],
        })
        .expect(201);
      expect((await search({ q: 'quokka' })).items).toEqual([]);
      await index();
      expect((await search({ q: 'quokka' })).items.map((i) => i.title)).toEqual([
        expect.stringContaining('Quokka-shaped solder bridge'),
      ]);

      await owner.agent.post('/api/projects/greenhouse-vent-controller/unpublish').set(owner.headers).expect(200);
      await index();
      expect((await search({ q: 'quokka' })).items).toEqual([]);
      expect((await search({ q: 'quokka' }, member.agent)).items).toEqual([]);
      expect((await search({ q: 'quokka' }, owner.agent)).items).toHaveLength(1);
      expect((await search({ q: 'quokka' }, admin.agent)).items).toHaveLength(1);
      // Not even a count leaks.
      expect((await search({ q: 'greenhouse' })).facets.project.map((f) => f.value)).not.toContain(
        'greenhouse-vent-controller',
      );

      await owner.agent.post('/api/projects/greenhouse-vent-controller/publish').set(owner.headers).expect(200);
      await index();
      expect((await search({ q: 'quokka' })).items).toHaveLength(1);
    });

    it('never shows a draft project to anonymous readers or other members, and shows it to admins', async () => {
      const draft = await owner.agent
        .post('/api/projects')
        .set(owner.headers)
        .send({ title: 'Numbat soil probe', summary: 'moisture logger, not yet public', licence: 'MIT', hazards: [] })
        .expect(201);
      await index();
      expect((await search({ q: 'numbat' })).items).toEqual([]);
      expect((await search({ q: 'numbat' })).facets.kind).toEqual([]);
      expect((await search({ q: 'numbat' }, member.agent)).items).toEqual([]);
      // The project and the write-up sections it starts with.
      for (const agent of [owner.agent, admin.agent]) {
        const res = await search({ q: 'numbat' }, agent);
        expect(res.items.map((i) => i.kind)).toContain('project');
        expect(res.items.every((i) => i.project?.slug === draft.body.slug)).toBe(true);
      }
    });

    it('drops a deleted lesson', async () => {
      const lesson = await owner.agent
        .post('/api/projects/greenhouse-vent-controller/lessons')
        .set(owner.headers)
        .send({ body: 'Platypus rule: key every connector so it cannot go in backwards.', tags: [] })
        .expect(201);
      await index();
      expect((await search({ q: 'platypus' })).items.map((i) => i.kind)).toEqual(['lesson']);
      await owner.agent
        .delete(`/api/projects/greenhouse-vent-controller/lessons/${lesson.body.id}`)
        .set(owner.headers)
        .expect(204);
      await index();
      expect((await search({ q: 'platypus' })).items).toEqual([]);
      expect((await search({ q: 'platypus' }, admin.agent)).items).toEqual([]);
    });

    it('drops a hidden erratum after a full reindex, and both indexes hold the same documents', async () => {
      const list = (await t.agent().get('/api/projects/tide-clock/errata').expect(200)).body as { items: Erratum[] };
      const target = list.items.find((e) => e.pins.includes('GPIO35'))!;
      const url = `/projects/tide-clock/errata/${target.code}`;
      expect((await search({ q: 'GPIO35' })).items.map((i) => i.url)).toContain(url);
      // Moderation tools come later: hide it in the database, as a moderator's action will.
      await t.ctx.db.execute(
        sql`UPDATE errata SET hidden_at = now(), hidden_reason = 'contract test' WHERE id = ${target.id}`,
      );
      const report = await reindexEverything(t.ctx, attached.secondary);
      const postgresDocuments = Object.values(report.postgres).reduce((a, b) => a + b, 0);
      expect(report.processed).toBeGreaterThanOrEqual(postgresDocuments);
      if (attached.secondary) expect(report.secondary).toEqual({ name, documents: postgresDocuments });
      else expect(report.secondary).toBeNull();
      expect((await search({ q: 'GPIO35' })).items.map((i) => i.url)).not.toContain(url);
      expect((await search({ q: 'GPIO35' }, member.agent)).items.map((i) => i.url)).not.toContain(url);
      expect((await search({ q: 'GPIO35' }, admin.agent)).items.map((i) => i.url)).toContain(url);

      await t.ctx.db.execute(sql`UPDATE errata SET hidden_at = NULL, hidden_reason = NULL WHERE id = ${target.id}`);
      await index();
      expect((await search({ q: 'GPIO35' })).items.map((i) => i.url)).toContain(url);
    });

    // Only Meilisearch is a secondary the indexer can lose on the way.
    if (name === 'meilisearch')
      it('queues a batch again when Meilisearch refuses it, and indexes it once it accepts', async () => {
        await owner.agent
          .post('/api/projects/greenhouse-vent-controller/lessons')
          .set(owner.headers)
          .send({ body: 'Echidna rule: label both ends of every cable.', tags: [] })
          .expect(201);
        const refusing = new MeilisearchSearch({ url: attached.meilisearchUrl!, apiKey: 'not-the-key' });
        await indexPending(t.ctx, { secondary: refusing });
        const left = await t.ctx.db.execute<{ n: number }>(sql`SELECT count(*)::int AS n FROM search_outbox`);
        expect(left.rows[0]!.n).toBeGreaterThan(0);
        expect((await search({ q: 'echidna' })).items).toEqual([]);
        await index();
        expect((await search({ q: 'echidna' })).items.map((i) => i.kind)).toEqual(['lesson']);
      });

    it('leaves nothing in the outbox after indexing', async () => {
      await index();
      const left = await t.ctx.db.execute(sql`SELECT count(*)::int AS n FROM search_outbox`);
      expect(left.rows[0]).toEqual({ n: 0 });
    });
  });
});
