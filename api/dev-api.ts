/** The API alone, for `npm run dev` (the client comes from the Vite dev server). */
import path from 'node:path';
import { loadConfigOrExit, repoRoot } from './config';
import { createLogger } from './log';
import { startServer } from './server';

const config = loadConfigOrExit();
const log = createLogger(config.LOG_LEVEL);
const running = await startServer(config, {
  log,
  fakeAccountsFile: path.join(repoRoot, '.data', 'fake-github-accounts.json'),
});
log.info(`API listening on ${running.url}`);
const shutdown = () => void running.stop().then(() => process.exit(0));
process.on('SIGINT', shutdown);
process.on('SIGTERM', shutdown);
