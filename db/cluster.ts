/**
 * The embedded PostgreSQL 15 server: found (or installed from Debian's packages when running
 * as root), initialised under a data folder, started on 127.0.0.1 and stopped with `-m fast`.
 * Used by `npm start`, the db:* scripts and the test harness (with a throwaway folder).
 */
import { execFileSync, spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import pg from 'pg';

export const PG_BIN = process.env.PG_BIN ?? '/usr/lib/postgresql/15/bin';
/** Debian's package of the RUM index the search uses when it can (api/search/postgres.ts). */
const RUM_PACKAGE = 'postgresql-15-rum';
const RUM_CONTROL = '/usr/share/postgresql/15/extension/rum.control';
const INSTALL_COMMAND = `apt-get update && apt-get install -y postgresql postgresql-contrib ${RUM_PACKAGE}`;

const isRoot = () => typeof process.getuid === 'function' && process.getuid() === 0;

export class ClusterError extends Error {
  override name = 'ClusterError';
}

/** Make sure the server binaries exist; install them when running as root. */
export function ensureServerBinaries(log: (line: string) => void = console.log): void {
  if (fs.existsSync(path.join(PG_BIN, 'postgres'))) {
    ensureRum(log);
    return;
  }
  if (!isRoot()) {
    throw new ClusterError(
      `PostgreSQL 15 server binaries were not found in ${PG_BIN}.\n` +
        `Install them with (as root):\n  ${INSTALL_COMMAND}\n` +
        'or set DATABASE_URL to use a PostgreSQL server you already run.',
    );
  }
  log(`PostgreSQL 15 not found; installing Debian's packages: ${INSTALL_COMMAND}`);
  const result = spawnSync('sh', ['-c', `DEBIAN_FRONTEND=noninteractive ${INSTALL_COMMAND}`], { stdio: 'inherit' });
  if (result.status !== 0 || !fs.existsSync(path.join(PG_BIN, 'postgres'))) {
    throw new ClusterError(`Installing PostgreSQL failed. Run it yourself:\n  ${INSTALL_COMMAND}`);
  }
}

/**
 * The RUM extension is optional: search works without it, slower for words of middling
 * frequency. Installed when missing and running as root; otherwise a hint.
 */
function ensureRum(log: (line: string) => void): void {
  if (fs.existsSync(RUM_CONTROL)) return;
  if (!isRoot()) {
    log(`The RUM index extension is not installed; search uses GIN (slower at scale). As root: apt-get install -y ${RUM_PACKAGE}`);
    return;
  }
  log(`Installing Debian's ${RUM_PACKAGE} (the search index extension) …`);
  const result = spawnSync('sh', ['-c', `DEBIAN_FRONTEND=noninteractive apt-get install -y ${RUM_PACKAGE} || (apt-get update && DEBIAN_FRONTEND=noninteractive apt-get install -y ${RUM_PACKAGE})`], { stdio: 'inherit' });
  if (result.status !== 0) log(`Installing ${RUM_PACKAGE} failed; search uses GIN (slower at scale).`);
}

/** Run a PostgreSQL binary, as the `postgres` system user when we are root (it refuses root). */
function runPg(binary: string, args: string[], options: { quiet?: boolean } = {}): string {
  const file = path.join(PG_BIN, binary);
  try {
    if (isRoot()) {
      const quoted = [file, ...args].map((a) => `'${a.replace(/'/g, `'\\''`)}'`).join(' ');
      return execFileSync('su', ['postgres', '-s', '/bin/sh', '-c', quoted], {
        encoding: 'utf8',
        stdio: ['ignore', 'pipe', 'pipe'],
      });
    }
    return execFileSync(file, args, { encoding: 'utf8', stdio: ['ignore', 'pipe', 'pipe'] });
  } catch (error) {
    const e = error as { stderr?: string; stdout?: string; status?: number };
    if (options.quiet) throw error;
    throw new ClusterError(`${binary} ${args.join(' ')} failed (status ${e.status}):\n${e.stderr ?? ''}${e.stdout ?? ''}`);
  }
}

function chownToPostgres(dir: string): void {
  if (isRoot()) execFileSync('chown', ['-R', 'postgres:postgres', dir]);
}

export interface ClusterOptions {
  dataDir: string;
  port: number;
  log?: (line: string) => void;
}

export interface RunningCluster {
  port: number;
  superuserUrl: string;
  /** True when this process started the server (and should stop it). */
  startedHere: boolean;
  stop(): void;
}

function isRunning(dataDir: string): boolean {
  if (!fs.existsSync(path.join(dataDir, 'postmaster.pid'))) return false;
  try {
    runPg('pg_ctl', ['-D', dataDir, 'status'], { quiet: true });
    return true;
  } catch {
    return false;
  }
}

/** Initialise the cluster on first use, then start it (or reuse it when already running). */
export function startCluster({ dataDir, port, log = console.log }: ClusterOptions): RunningCluster {
  ensureServerBinaries(log);
  const runDir = `${dataDir}-run`;
  fs.mkdirSync(runDir, { recursive: true });
  if (!fs.existsSync(path.join(dataDir, 'PG_VERSION'))) {
    log(`Creating a PostgreSQL cluster in ${dataDir}`);
    fs.mkdirSync(dataDir, { recursive: true });
    chownToPostgres(dataDir);
    runPg('initdb', ['-D', dataDir, '-U', 'postgres', '--auth=trust', '--encoding=UTF8', '--locale=C.UTF-8']);
  }
  chownToPostgres(runDir);
  const superuserUrl = `postgres://postgres@127.0.0.1:${port}/postgres`;
  if (isRunning(dataDir)) {
    log(`PostgreSQL is already running from ${dataDir}; reusing it`);
    return { port, superuserUrl, startedHere: false, stop: () => {} };
  }
  const logFile = path.join(runDir, 'server.log');
  // fsync stays on (the default): acknowledged writes must survive a crash.
  runPg('pg_ctl', [
    '-D', dataDir,
    '-l', logFile,
    '-o', `-p ${port} -c listen_addresses=127.0.0.1 -k ${runDir}`,
    '-w', '-t', '60',
    'start',
  ]);
  log(`PostgreSQL started on 127.0.0.1:${port}`);
  let stopped = false;
  return {
    port,
    superuserUrl,
    startedHere: true,
    stop() {
      if (stopped) return;
      stopped = true;
      // Ctrl-C in a terminal reaches the server too (same process group) and starts its own
      // fast shutdown; then there is nothing left for us to stop.
      if (!isRunning(dataDir)) {
        log('PostgreSQL stopped');
        return;
      }
      try {
        runPg('pg_ctl', ['-D', dataDir, '-m', 'fast', '-w', '-t', '60', 'stop']);
      } catch (error) {
        if (isRunning(dataDir)) throw error;
      }
      log('PostgreSQL stopped');
    },
  };
}

/**
 * RUM is not a trusted extension: only a superuser may create it, so it is created here, before
 * the migrations (run as the application role) look for it. Does nothing when not installed.
 */
export async function createRumExtension(databaseSuperuserUrl: string): Promise<boolean> {
  const client = new pg.Client({ connectionString: databaseSuperuserUrl });
  await client.connect();
  try {
    const available = await client.query(`SELECT 1 FROM pg_available_extensions WHERE name = 'rum'`);
    if (!available.rowCount) return false;
    await client.query('CREATE EXTENSION IF NOT EXISTS rum');
    return true;
  } finally {
    await client.end();
  }
}

/** Create the application role and database when missing; returns the application's URL. */
export async function ensureDatabase(
  superuserUrl: string,
  { role, password, database }: { role: string; password: string; database: string },
): Promise<string> {
  const client = new pg.Client({ connectionString: superuserUrl });
  await client.connect();
  try {
    const roleExists = await client.query('SELECT 1 FROM pg_roles WHERE rolname = $1', [role]);
    if (roleExists.rowCount === 0) {
      await client.query(`CREATE ROLE ${pg.escapeIdentifier(role)} LOGIN PASSWORD ${pg.escapeLiteral(password)}`);
    }
    const dbExists = await client.query('SELECT 1 FROM pg_database WHERE datname = $1', [database]);
    if (dbExists.rowCount === 0) {
      await client.query(`CREATE DATABASE ${pg.escapeIdentifier(database)} OWNER ${pg.escapeIdentifier(role)}`);
    }
  } finally {
    await client.end();
  }
  const inDatabase = new URL(superuserUrl);
  inDatabase.pathname = `/${database}`;
  await createRumExtension(inDatabase.toString());
  const url = new URL(superuserUrl);
  url.username = role;
  url.password = password;
  url.pathname = `/${database}`;
  return url.toString();
}
