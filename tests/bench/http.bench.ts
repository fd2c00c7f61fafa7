/**
 * Baseline for every HTTP figure: a bare Express 5 JSON endpoint, served by the same child
 * process and measured in the same run as our endpoints, so results read as ratios.
 */
import { fmt, load, startBenchDatabase, startBenchServers, type LoadResult } from './harness';

export async function run(seconds: number): Promise<string[]> {
  const database = await startBenchDatabase();
  const servers = await startBenchServers(database.url);
  const results: LoadResult[] = [];
  try {
    results.push(await load('bare Express JSON (baseline)', `${servers.bare}/json`, { seconds }));
    results.push(await load('GET /api/health (one SELECT 1)', `${servers.app}/api/health`, { seconds }));
    results.push(await load('GET /api/me, anonymous (full middleware stack)', `${servers.app}/api/me`, { seconds }));
  } finally {
    await servers.stop();
    await database.stop();
  }
  const base = results[0]!.requestsPerSecond;
  return [
    'autocannon, 10 connections, ' + seconds + ' s per endpoint; servers in a child process, load from the parent.',
    '',
    '| endpoint | req/s | ratio to baseline | p50 ms | p99 ms | non-2xx |',
    '|---|---|---|---|---|---|',
    ...results.map(
      (r) =>
        `| ${r.label} | ${fmt(r.requestsPerSecond, 0)} | ${fmt(r.requestsPerSecond / base)} | ${fmt(r.latencyP50Ms, 1)} | ${fmt(r.latencyP99Ms, 1)} | ${r.non2xx + r.errors} |`,
    ),
  ];
}
