/**
 * Search at 100,000 documents: p50/p95 through the API for rare, common and multi-word
 * queries, next to the same candidate-and-rank SQL timed directly on the database in the same
 * run, and next to the naive "rank every match with ts_rank" query for contrast. Then relevance:
 * precision@5 and mean reciprocal rank over the labelled queries (demo data plus the corpus).
 *
 * The corpus database is built once into tests/bench/out/search-pg and reused by later runs.
 */
import fs from 'node:fs';
import path from 'node:path';
import { sql } from 'drizzle-orm';
import { loadConfig } from '../../api/config';
import type { AppContext } from '../../api/context';
import { fakeGithubEndpoints } from '../../api/fakes/github';
import { createLogger } from '../../api/log';
import { ANONYMOUS } from '../../api/search/backend';
import { indexPending } from '../../api/search/indexer';
import { CANDIDATES, PostgresSearch, TITLE_CANDIDATES, tsqueryFor } from '../../api/search/postgres';
import { searchQuerySchema } from '../../shared/contracts/search';
import { createDatabase } from '../../db/client';
import { ensureDatabase, startCluster } from '../../db/cluster';
import { migrateDatabase } from '../../db/migrate';
import { seedDemoIfEmpty } from '../../db/seed';
import { labelledQueries, matches } from '../fixtures/search-relevance';
import { fmt, percentile, startBenchServers } from './harness';
import { buildCorpus, PART_COUNT, partName, WORDS } from './search-corpus';
import { freePort } from '../setup/postgres';

const OUT = path.join(import.meta.dirname, 'out', 'search-pg');
const RUNS = 12;
const WARMUP = 3;

async function corpusDatabase(log: (line: string) => void) {
  fs.mkdirSync(OUT, { recursive: true });
  fs.chmodSync(path.dirname(OUT), 0o755);
  fs.chmodSync(OUT, 0o755);
  const cluster = startCluster({ dataDir: path.join(OUT, 'data'), port: await freePort(), log: () => {} });
  const url = await ensureDatabase(cluster.superuserUrl, { role: 'bench', password: 'bench', database: 'search' });
  await migrateDatabase(url);
  const database = createDatabase(url, { max: 10, log: () => {} });
  const marker = path.join(OUT, 'built');
  if (!fs.existsSync(marker)) {
    log('building the 100,000-item corpus (once; kept in tests/bench/out/search-pg) …');
    const started = Date.now();
    await seedDemoIfEmpty(database.db);
    await buildCorpus(database.db);
    const ctx = contextFor(database);
    await indexPending(ctx);
    await database.db.execute(sql`VACUUM ANALYZE search_docs`);
    fs.writeFileSync(marker, new Date().toISOString());
    log(`corpus built and indexed in ${((Date.now() - started) / 1000).toFixed(0)} s`);
  }
  return {
    url,
    database,
    stop: async () => {
      await database.close();
      cluster.stop();
    },
  };
}

function contextFor(database: ReturnType<typeof createDatabase>): AppContext {
  return {
    config: loadConfig({ NODE_ENV: 'test', LOG_LEVEL: 'silent' }),
    database,
    db: database.db,
    log: createLogger('silent'),
    github: fakeGithubEndpoints('http://127.0.0.1:9', 'b', 'b'),
  } as unknown as AppContext;
}

export async function run(): Promise<string[]> {
  const out: string[] = [];
  const corpus = await corpusDatabase((line) => console.log(line));
  const db = corpus.database.db;
  const [{ n: docs } = { n: 0 }] = (await db.execute<{ n: number }>(sql`SELECT count(*)::int AS n FROM search_docs`))
    .rows;
  const servers = await startBenchServers(corpus.url);
  try {
    // Query classes: part numbers (a handful of items each), the commonest words (nearly every
    // item), and two or three mid-frequency words together.
    const rare = Array.from({ length: 15 }, (_, i) => partName((i * 331) % PART_COUNT));
    const common = WORDS.slice(0, 6);
    const multi = Array.from(
      { length: 15 },
      (_, i) => `${WORDS[20 + i]} ${WORDS[40 + ((i * 7) % 60)]}${i % 2 ? ` ${WORDS[110 + i]}` : ''}`,
    );
    const classes: Array<[string, string[]]> = [
      ['rare (a part number)', rare],
      ['common (one of the commonest words)', common],
      ['multi-word (2–3 mid-frequency words)', multi],
    ];
    const counts = await Promise.all(
      [rare[0]!, common[0]!, multi[0]!].map(async (q) => {
        const tsq = tsqueryFor(q)!;
        return (await db.execute<{ n: number }>(sql`SELECT count(*)::int AS n FROM search_docs WHERE tsv @@ ${tsq}`))
          .rows[0]!.n;
      }),
    );
    out.push(
      `Corpus: ${docs.toLocaleString('en')} indexed items (60,000 generated errata, 40,000 generated log entries, 100 projects, plus the demo data). ` +
        `Matches for the first query of each class: rare ${counts[0]}, common ${counts[1]}, multi-word ${counts[2]}.`,
      '',
      `Each query ${RUNS} times after ${WARMUP} warm-up runs, one at a time: the API through HTTP (GET /api/search, anonymous, first page of 20, ` +
        'with facets and highlighted snippets); the raw SQL is the same statements the API runs (the planner estimate that picks the strategy, then the one search statement), timed on the database directly; ' +
        'the naive SQL ranks every match with ts_rank.',
      '',
      '| class | API p50 ms | API p95 ms | raw SQL p50 ms | raw SQL p95 ms | API / raw (p50) | API / raw (p95) | naive SQL p95 ms |',
      '|---|---|---|---|---|---|---|---|',
    );
    // The same statements the API runs (the strategy's estimate, then the search), on the database.
    const direct = new PostgresSearch(db);
    for (const [label, queries] of classes) {
      const api: number[] = [];
      const raw: number[] = [];
      const naive: number[] = [];
      for (const q of queries) {
        const parsed = searchQuerySchema.parse({ q });
        const url = `${servers.app}/api/search?q=${encodeURIComponent(q)}`;
        for (let i = 0; i < WARMUP + RUNS; i++) {
          let started = process.hrtime.bigint();
          const res = await fetch(url);
          if (!res.ok) throw new Error(`search answered ${res.status}`);
          await res.json();
          const apiMs = Number(process.hrtime.bigint() - started) / 1e6;
          started = process.hrtime.bigint();
          await db.execute(await direct.statementFor(parsed, ANONYMOUS, q));
          const rawMs = Number(process.hrtime.bigint() - started) / 1e6;
          if (i >= WARMUP) {
            api.push(apiMs);
            raw.push(rawMs);
          }
        }
        if (queries.indexOf(q) < 3) {
          const tsq = tsqueryFor(q)!;
          for (let i = 0; i < 4; i++) {
            const started = process.hrtime.bigint();
            await db.execute(
              sql`SELECT id FROM search_docs WHERE tsv @@ ${tsq} AND visible ORDER BY ts_rank(tsv, ${tsq}) DESC LIMIT 20`,
            );
            if (i > 0) naive.push(Number(process.hrtime.bigint() - started) / 1e6);
          }
        }
      }
      out.push(
        `| ${label} | ${fmt(percentile(api, 50), 1)} | ${fmt(percentile(api, 95), 1)} | ${fmt(percentile(raw, 50), 1)} | ${fmt(percentile(raw, 95), 1)} | ${fmt(percentile(api, 50) / percentile(raw, 50))} | ${fmt(percentile(api, 95) / percentile(raw, 95))} | ${fmt(percentile(naive, 95), 1)} |`,
      );
    }

    // The floor under every API figure: one round trip to a bare Express JSON endpoint.
    const bare: number[] = [];
    for (let i = 0; i < 200; i++) {
      const started = process.hrtime.bigint();
      await (await fetch(`${servers.bare}/json`)).json();
      if (i >= 20) bare.push(Number(process.hrtime.bigint() - started) / 1e6);
    }
    out.push(
      '',
      `A round trip to a bare Express JSON endpoint, same run: p50 ${fmt(percentile(bare, 50), 2)} ms, p95 ${fmt(percentile(bare, 95), 2)} ms.`,
    );

    // Relevance over the same database: through the API (the candidate bounds it runs with),
    // then through the same pipeline with bounds wider than the corpus (every match ranked).
    type Hit = { url: string; kind: string; title: string };
    const relevance = async (
      label: string,
      searchFor: (labelled: (typeof labelledQueries)[number]) => Promise<Hit[]>,
    ) => {
      let precisionSum = 0;
      let reciprocalSum = 0;
      const missed: string[] = [];
      for (const labelled of labelledQueries) {
        const items = await searchFor(labelled);
        const top5 = items.slice(0, 5);
        const found = labelled.mustFind.filter((t) => top5.some((h) => matches(t, h))).length;
        precisionSum += Math.min(found, 5) / Math.min(5, labelled.mustFind.length);
        const first = items.findIndex((h) => labelled.mustFind.some((t) => matches(t, h)));
        reciprocalSum += first >= 0 ? 1 / (first + 1) : 0;
        if (found < labelled.mustFind.length) missed.push(`\`${labelled.q}\``);
      }
      return `| ${label} | ${fmt(precisionSum / labelledQueries.length, 3)} | ${fmt(reciprocalSum / labelledQueries.length, 3)} | ${missed.length}${missed.length ? ` (${missed.join(', ')})` : ''} |`;
    };
    const unbounded = new PostgresSearch(db, { candidates: 1_000_000, titleCandidates: 1_000_000 });
    out.push(
      '',
      `Relevance over ${labelledQueries.length} labelled queries (tests/fixtures/search-relevance.ts) on this corpus ` +
        '(precision@5: share of must-find items in the first five; MRR: mean reciprocal rank of the first must-find item):',
      '',
      '| ranking | precision@5 | MRR | must-find misses |',
      '|---|---|---|---|',
      await relevance(`API (${CANDIDATES} + ${TITLE_CANDIDATES} newest candidates)`, async (labelled) => {
        const params = new URLSearchParams({ q: labelled.q, ...labelled.params, pageSize: '10' });
        return ((await (await fetch(`${servers.app}/api/search?${params}`)).json()) as { items: Hit[] }).items;
      }),
      await relevance(
        'every match ranked (same pipeline, no bound)',
        async (labelled) =>
          (
            await unbounded.search(
              searchQuerySchema.parse({ q: labelled.q, ...labelled.params, pageSize: '10' }),
              ANONYMOUS,
            )
          ).items,
      ),
    );
  } finally {
    await servers.stop();
    await corpus.stop();
  }
  return out;
}
