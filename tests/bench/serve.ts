/**
 * The servers under load, in their own process so the load generator (autocannon, in the
 * parent) does not share their event loop. Prints one JSON line with the URLs, then waits.
 */
import express from 'express';
import { createApp } from '../../api/app';
import { loadConfig } from '../../api/config';
import type { AppContext } from '../../api/context';
import { fakeGithubEndpoints } from '../../api/fakes/github';
import { createJobs } from '../../api/jobs/queue';
import { createLogger } from '../../api/log';
import { createMailer } from '../../api/mail/mailer';
import { createStorage } from '../../api/storage/storage';
import { createDatabase } from '../../db/client';
import { listen } from './harness';

const databaseUrl = process.env.BENCH_DATABASE_URL!;
const bare = express();
bare.get('/json', (_req, res) => {
  res.json({ status: 'ok' });
});
const database = createDatabase(databaseUrl, { max: 10, log: () => {} });
const config = loadConfig({ NODE_ENV: 'production', SESSION_SECRET: 'b'.repeat(40), APP_ORIGIN: 'http://127.0.0.1', LOG_LEVEL: 'silent', SEARCH_RATE_PER_MINUTE: '1000000' });
const base = {
  config,
  database,
  db: database.db,
  log: createLogger('silent'),
  github: fakeGithubEndpoints('http://127.0.0.1:9', 'bench', 'bench'),
  mail: createMailer(config),
  // Never written to here: no benchmark in this file uploads.
  storage: createStorage(config),
};
// The benchmarks send no mail: the queue is never started, and enqueueing would throw.
const ctx: AppContext = { ...base, jobs: createJobs(base, { workers: false }) };
const a = await listen(bare);
const b = await listen(createApp(ctx).app);
console.log(JSON.stringify({ bare: a.url, app: b.url }));
process.on('SIGTERM', () => {
  void Promise.all([a.close(), b.close(), database.close()]).then(() => process.exit(0));
});
