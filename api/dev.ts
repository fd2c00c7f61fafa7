/**
 * `npm run dev`: the database once (embedded cluster unless DATABASE_URL is set), then the API
 * under `tsx watch` (restarts on change) and the Vite dev server with hot reload, which
 * proxies /api to the API. Open http://localhost:5173. Ctrl-C stops all of it.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import path from 'node:path';
import { createDatabase } from '../db/client';
import { openEmbeddedOrConfigured } from '../db/local';
import { migrateDatabase } from '../db/migrate';
import { seedDemoIfEmpty } from '../db/seed';
import { loadConfigOrExit, repoRoot } from './config';

const VITE_ORIGIN = 'http://localhost:5173';
const config = loadConfigOrExit({ ...process.env, APP_ORIGIN: process.env.APP_ORIGIN ?? VITE_ORIGIN });
const { url, cluster } = await openEmbeddedOrConfigured(config);
await migrateDatabase(url);
const database = createDatabase(url, { max: 2 });
if (config.SEED_DEMO && (await seedDemoIfEmpty(database.db))) console.log('Demo data seeded.');
await database.close();

const env = { ...process.env, DATABASE_URL: url, APP_ORIGIN: config.appOrigin, SEED_DEMO: 'false' };
const children: ChildProcess[] = [
  spawn(process.execPath, [path.join(repoRoot, 'node_modules/tsx/dist/cli.mjs'), 'watch', '--clear-screen=false', 'api/dev-api.ts'], {
    cwd: repoRoot,
    env,
    stdio: 'inherit',
  }),
  spawn(process.execPath, [path.join(repoRoot, 'node_modules/vite/bin/vite.js')], { cwd: repoRoot, env, stdio: 'inherit' }),
];
console.log(`Reworkbook (development) at ${VITE_ORIGIN}; the API listens on ${config.HOST}:${config.PORT}.`);

let stopping = false;
function stop() {
  if (stopping) return;
  stopping = true;
  for (const child of children) child.kill('SIGTERM');
  setTimeout(() => {
    if (cluster?.startedHere) cluster.stop();
    process.exit(0);
  }, 1500);
}
process.on('SIGINT', stop);
process.on('SIGTERM', stop);
for (const child of children) child.on('exit', () => !stopping && stop());
