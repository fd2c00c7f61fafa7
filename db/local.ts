/**
 * Resolves the database a command should use: DATABASE_URL when set, otherwise the embedded
 * cluster under PG_DATA_DIR (started for the command and stopped after, unless it was running).
 */
import { loadConfigOrExit, type Config } from '../api/config';
import { ensureDatabase, startCluster, type RunningCluster } from './cluster';

export const LOCAL_ROLE = { role: 'reworkbook', password: 'reworkbook', database: 'reworkbook' };

export async function openEmbeddedOrConfigured(
  config: Config,
  log: (line: string) => void = console.log,
): Promise<{ url: string; cluster: RunningCluster | null }> {
  if (config.DATABASE_URL) return { url: config.DATABASE_URL, cluster: null };
  const cluster = startCluster({ dataDir: config.dataDir, port: config.PG_PORT, log });
  try {
    const url = await ensureDatabase(cluster.superuserUrl, LOCAL_ROLE);
    return { url, cluster };
  } catch (error) {
    if (cluster.startedHere) cluster.stop();
    throw error;
  }
}

export async function withDatabaseUrl(fn: (url: string, config: Config) => Promise<void>): Promise<void> {
  const config = loadConfigOrExit();
  const { url, cluster } = await openEmbeddedOrConfigured(config);
  try {
    await fn(url, config);
  } finally {
    if (cluster?.startedHere) cluster.stop();
  }
}
