/**
 * `npm start`: the embedded default. Builds the client if needed, starts PostgreSQL on
 * loopback (unless DATABASE_URL is set), the local fakes and the server; Ctrl-C or SIGTERM
 * stops the server gracefully, then PostgreSQL.
 */
import path from 'node:path';
import { ClusterError } from '../db/cluster';
import { ensureClientBuild } from './client-build';
import { loadConfigOrExit, repoRoot } from './config';
import { createLogger } from './log';
import { defaultClientDir, startServer } from './server';

const config = loadConfigOrExit();
const log = createLogger(config.LOG_LEVEL);
const clientDir = defaultClientDir(repoRoot);

try {
  ensureClientBuild(repoRoot, clientDir, (line) => log.info(line));
  const running = await startServer(config, {
    clientDir,
    log,
    fakeAccountsFile: path.join(repoRoot, '.data', 'fake-github-accounts.json'),
  });
  log.info(`Reworkbook is running at ${config.appOrigin} (listening on ${running.url}). Ctrl-C stops it.`);

  let stopping = false;
  const shutdown = (signal: string) => {
    if (stopping) return;
    stopping = true;
    log.info(`${signal} received: stopping`);
    running.stop().then(
      () => process.exit(0),
      (error: unknown) => {
        log.error('shutdown failed', error);
        process.exit(1);
      },
    );
  };
  process.on('SIGINT', () => shutdown('SIGINT'));
  process.on('SIGTERM', () => shutdown('SIGTERM'));
} catch (error) {
  if (error instanceof ClusterError) log.error(error.message);
  else log.error('Reworkbook could not start', error);
  process.exit(1);
}
