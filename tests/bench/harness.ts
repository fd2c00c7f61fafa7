/**
 * Shared pieces of `npm run bench`: a throwaway PostgreSQL with the demo data, load runs with
 * autocannon, and percentiles of timed loops. Figures are for ratios within one run; absolute
 * numbers move with the machine's load.
 */
import { spawn } from 'node:child_process';
import fs from 'node:fs';
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import os from 'node:os';
import path from 'node:path';
import autocannon from 'autocannon';
import type { Express } from 'express';
import { createDatabase, type Database } from '../../db/client';
import { ensureDatabase, startCluster } from '../../db/cluster';
import { migrateDatabase } from '../../db/migrate';
import { seedDemoIfEmpty } from '../../db/seed';
import { freePort } from '../setup/postgres';

export interface BenchDatabase extends Database {
  url: string;
  stop(): Promise<void>;
}

/** Clusters still running, stopped on exit even when a benchmark fails half-way. */
const running = new Set<() => void>();
process.on('exit', () => {
  for (const stop of running) stop();
});

export async function startBenchDatabase(): Promise<BenchDatabase> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'rwb-bench-'));
  fs.chmodSync(dir, 0o755);
  const cluster = startCluster({ dataDir: path.join(dir, 'data'), port: await freePort(), log: () => {} });
  const emergencyStop = () => {
    cluster.stop();
    fs.rmSync(dir, { recursive: true, force: true });
  };
  running.add(emergencyStop);
  const url = await ensureDatabase(cluster.superuserUrl, { role: 'bench', password: 'bench', database: 'bench' });
  await migrateDatabase(url);
  const database = createDatabase(url, { max: 10, log: () => {} });
  await seedDemoIfEmpty(database.db);
  return {
    ...database,
    url,
    async stop() {
      running.delete(emergencyStop);
      await database.close();
      emergencyStop();
    },
  };
}

export async function listen(app: Express): Promise<{ url: string; close(): Promise<void> }> {
  const server: Server = await new Promise((resolve) => {
    const s = app.listen(0, '127.0.0.1', () => resolve(s));
  });
  const { port } = server.address() as AddressInfo;
  return {
    url: `http://127.0.0.1:${port}`,
    close: () =>
      new Promise((resolve) => {
        server.close(() => resolve());
        server.closeAllConnections();
      }),
  };
}

export interface LoadResult {
  label: string;
  requestsPerSecond: number;
  latencyP50Ms: number;
  latencyP99Ms: number;
  non2xx: number;
  errors: number;
}

export async function load(label: string, url: string, options: { seconds?: number; headers?: Record<string, string> } = {}) {
  const result = await autocannon({ url, connections: 10, duration: options.seconds ?? 10, headers: options.headers ?? {} });
  return {
    label,
    requestsPerSecond: result.requests.average,
    latencyP50Ms: result.latency.p50,
    latencyP99Ms: result.latency.p99,
    non2xx: result.non2xx,
    errors: result.errors,
  } satisfies LoadResult;
}

export function percentile(samples: number[], p: number): number {
  const sorted = [...samples].sort((a, b) => a - b);
  const index = Math.min(sorted.length - 1, Math.max(0, Math.ceil((p / 100) * sorted.length) - 1));
  return sorted[index] ?? NaN;
}

/** Time `fn` `runs` times after `warmup` runs; milliseconds per run. */
export async function timeRuns(fn: () => unknown, runs: number, warmup = Math.ceil(runs / 10)): Promise<number[]> {
  for (let i = 0; i < warmup; i++) await fn();
  const samples: number[] = [];
  for (let i = 0; i < runs; i++) {
    const started = process.hrtime.bigint();
    await fn();
    samples.push(Number(process.hrtime.bigint() - started) / 1e6);
  }
  return samples;
}

export const fmt = (n: number, digits = 2) => (Number.isFinite(n) ? n.toFixed(digits) : 'n/a');

/** Start tests/bench/serve.ts in a child process against `databaseUrl`; resolves with its URLs. */
export async function startBenchServers(databaseUrl: string): Promise<{ bare: string; app: string; stop(): Promise<void> }> {
  const child = spawn(process.execPath, [path.join(import.meta.dirname, '../../node_modules/tsx/dist/cli.mjs'), path.join(import.meta.dirname, 'serve.ts')], {
    env: { ...process.env, BENCH_DATABASE_URL: databaseUrl },
    stdio: ['ignore', 'pipe', 'inherit'],
  });
  const urls = await new Promise<{ bare: string; app: string }>((resolve, reject) => {
    let buffer = '';
    child.stdout!.on('data', (chunk: Buffer) => {
      buffer += chunk.toString();
      const line = buffer.split('\n').find((l) => l.startsWith('{'));
      if (line) resolve(JSON.parse(line) as { bare: string; app: string });
    });
    child.once('exit', (code) => reject(new Error(`bench server exited with ${code}`)));
  });
  return {
    ...urls,
    stop: () =>
      new Promise((resolve) => {
        child.once('exit', () => resolve());
        child.kill('SIGTERM');
      }),
  };
}
