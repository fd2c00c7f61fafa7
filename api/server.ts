/**
 * Starts the whole product in one process tree: the database (embedded cluster unless
 * DATABASE_URL is set), migrations, demo data when empty, the local fakes for hosted
 * services, and the HTTP server. Returns a `stop` that shuts everything down in order.
 */
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import path from 'node:path';
import { createDatabase } from '../db/client';
import { openEmbeddedOrConfigured } from '../db/local';
import { migrateDatabase } from '../db/migrate';
import { seedDemoIfEmpty } from '../db/seed';
import { seedParts } from '../db/parts/seed';
import { createApp } from './app';
import { repoRoot, type Config } from './config';
import { realGithub, type AppContext } from './context';
import { fakeGithubEndpoints, startFakeGithub } from './fakes/github';
import { startFakeSmtp, type Outbox } from './fakes/smtp';
import { createJobs, type JobsOptions } from './jobs/queue';
import { createLogger, type Logger } from './log';
import { createMailer } from './mail/mailer';
import { startMaintenance } from './maintenance';
import { startSearchIndexer } from './search/indexer';
import { createSearchBackend } from './search/meilisearch';
import { createStorage } from './storage/storage';
import { reconcileUploads } from './uploads/jobs';

export const FAKE_CLIENT = { id: 'reworkbook-local', secret: 'reworkbook-local-secret' };

export interface RunningServer {
  url: string;
  ctx: AppContext;
  server: Server;
  stop(): Promise<void>;
}

export interface StartOptions {
  /** The built client to serve; omitted in API-only runs. */
  clientDir?: string;
  log?: Logger;
  /** Use this database instead of resolving one from the configuration (tests). */
  databaseUrl?: string;
  /** Keep fake accounts created on the provider page between runs (development). */
  fakeAccountsFile?: string;
  /** Job queue options; workers run in this process by default. */
  jobs?: JobsOptions;
  /** Where the local mail capture keeps `.eml` files (default `.data/outbox` in development, none otherwise). */
  outboxDir?: string;
}

export async function startServer(config: Config, options: StartOptions = {}): Promise<RunningServer> {
  const log = options.log ?? createLogger(config.LOG_LEVEL);
  const stops: Array<() => Promise<void> | void> = [];
  const stopAll = async () => {
    for (const stop of stops.reverse()) {
      try {
        await stop();
      } catch (error) {
        log.error('error while stopping', error);
      }
    }
    stops.length = 0;
  };

  try {
    let url = options.databaseUrl;
    if (!url) {
      const resolved = await openEmbeddedOrConfigured(config, (line) => log.info(line));
      url = resolved.url;
      const cluster = resolved.cluster;
      if (cluster?.startedHere) stops.push(() => cluster.stop());
    }
    await migrateDatabase(url);
    const database = createDatabase(url, { max: config.DB_POOL_MAX, log: (m) => log.warn(m) });
    stops.push(() => database.close());
    // Parts are reference data, needed with or without the demo.
    const seededParts = await seedParts(database.db);
    if (seededParts.inserted.length || seededParts.updated.length) {
      log.info(`Parts library: ${seededParts.inserted.length} added, ${seededParts.updated.length} updated from db/parts.`);
    }
    if (config.SEED_DEMO && (await seedDemoIfEmpty(database.db))) log.info('Demo data seeded (see README for the accounts).');

    let github = config.useFakeGithub ? null : realGithub(config.GITHUB_CLIENT_ID!, config.GITHUB_CLIENT_SECRET!);
    if (!github) {
      const fake = await startFakeGithub({
        port: config.FAKE_GITHUB_PORT,
        clientId: FAKE_CLIENT.id,
        clientSecret: FAKE_CLIENT.secret,
        allowedRedirectOrigins: [config.appOrigin],
        ...(options.fakeAccountsFile ? { accountsFile: options.fakeAccountsFile } : {}),
      });
      stops.push(() => fake.close());
      github = fakeGithubEndpoints(fake.url, FAKE_CLIENT.id, FAKE_CLIENT.secret);
      log.info(`Local sign-in provider (stands in for GitHub) at ${fake.url}`);
    }

    let outbox: Outbox | undefined;
    if (config.useFakeSmtp) {
      const outboxDir = options.outboxDir ?? (config.NODE_ENV === 'development' ? path.join(repoRoot, '.data', 'outbox') : undefined);
      outbox = await startFakeSmtp({ port: config.FAKE_SMTP_PORT, ...(outboxDir ? { dir: outboxDir } : {}) });
      const capture = outbox;
      stops.push(() => capture.close());
      if (config.production) log.warn(`SMTP_URL is not set: e-mail is only captured locally (${outbox.url}) and never delivered.`);
      else log.info(`Local mail capture at ${outbox.url}; see /dev/outbox`);
    }
    const storage = createStorage(config);
    stops.push(() => storage.close?.());
    const base = {
      config,
      database,
      db: database.db,
      log,
      github,
      mail: createMailer(config, outbox?.url),
      storage,
      ...(outbox ? { outbox } : {}),
    };
    const jobs = createJobs(base, options.jobs);
    await jobs.start();
    // Stops before the mail capture and the database (stops run in reverse): running jobs finish first.
    stops.push(() => jobs.stop());
    // Meilisearch answers searches when configured; PostgreSQL's index is kept either way.
    const secondary = createSearchBackend(config);
    if (secondary) log.info(`Searches answered by Meilisearch at ${config.MEILISEARCH_URL} (fill it with npm run search:reindex)`);
    const ctx: AppContext = { ...base, jobs, ...(secondary ? { searchBackend: secondary } : {}) };
    // Storage and rows back in step (and lost variant jobs queued again) before any request.
    try {
      await reconcileUploads(ctx);
    } catch (error) {
      throw new Error(`Uploaded files could not be checked in ${storage.description}: ${(error as Error).message}`, { cause: error });
    }
    stops.push(startMaintenance(ctx));
    // Changes reach the search index through the outbox, about a second after they commit.
    stops.push(startSearchIndexer(ctx, secondary));
    const { app } = createApp(ctx, options.clientDir ? { clientDir: options.clientDir } : {});
    const server = await new Promise<Server>((resolve, reject) => {
      // Express 5 hands a listen error (a port in use) to this callback, not only to 'error'.
      const s = app.listen(config.PORT, config.HOST, (error?: Error) => (error ? reject(error) : resolve(s)));
      s.once('error', reject);
    });
    server.keepAliveTimeout = 5_000;
    server.requestTimeout = 60_000;
    stops.push(
      () =>
        new Promise<void>((resolve) => {
          // Finish requests in flight, refuse new ones; idle keep-alive sockets go at once.
          const timer = setTimeout(() => server.closeAllConnections(), 10_000);
          server.close(() => {
            clearTimeout(timer);
            resolve();
          });
          server.closeIdleConnections();
        }),
    );
    const { port } = server.address() as AddressInfo;
    return { url: `http://${config.HOST.includes(':') ? `[${config.HOST}]` : config.HOST}:${port}`, ctx, server, stop: stopAll };
  } catch (error) {
    await stopAll();
    throw error;
  }
}

export const defaultClientDir = (root: string) => path.join(root, 'dist', 'app');
