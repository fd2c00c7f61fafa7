/**
 * The job queue: pg-boss in the app's own PostgreSQL (its `pgboss` schema), through the app's
 * connection pool. `send` stores a job and returns; workers pick jobs up, and a job that throws
 * is retried with growing delays, so a mail server outage delays mail and loses none.
 *
 * Every process that enqueues starts a `Jobs` (it creates the queues); processes created with
 * `workers: false` only enqueue. Workers also own the schedules: the daily digest, the
 * sweep that recovers notifications whose enqueue was lost, and the hourly uploads sweep.
 * Photo variants (`upload-variants`) are made here too, off the request.
 */
import PgBoss from 'pg-boss';
import pg from 'pg';
import type { AppContext } from '../context';
import { DAILY_DIGEST_CRON, runDailyDigest } from './daily-digest';
import { enqueuePendingNotificationEmails, sendNotificationEmail } from './notification-email';
import { UPLOADS_SWEEP_CRON, processUploadVariants, sweepUploads } from '../uploads/jobs';

export type JobName =
  'notification-email' | 'daily-digest' | 'notification-email-sweep' | 'upload-variants' | 'uploads-sweep';

export interface Jobs {
  /** Stores the job and resolves with its id (null: a job with that singleton key is already waiting). Never waits for the work. */
  send(
    name: JobName,
    data: Record<string, unknown>,
    options?: { singletonKey?: string; startAfterSeconds?: number },
  ): Promise<string | null>;
  start(): Promise<void>;
  stop(): Promise<void>;
}

export interface JobsOptions {
  /** false: this process only enqueues (no handlers, no schedules, no queue maintenance). Default true. */
  workers?: boolean;
  /** Register the cron schedules (default: with workers). Tests switch them off and call the handlers. */
  schedule?: boolean;
  /** First retry delay; later ones double (default 30 s: twelve retries span well over a day). */
  retryDelaySeconds?: number;
  /** How often an idle worker looks for work (default 2 s). */
  pollingIntervalSeconds?: number;
}

export const SWEEP_CRON = '*/10 * * * *';
const SCHEMA = 'pgboss';

interface QueueSpec {
  policy: 'standard' | 'stately';
  retryLimit: number;
  retryDelay: number;
  retryBackoff: boolean;
  expireInSeconds: number;
}

function queueSpecs(options: JobsOptions): Record<JobName, QueueSpec> {
  const retryDelay = options.retryDelaySeconds ?? 30;
  return {
    // Stately: at most one waiting and one running job per singleton key (the notification id).
    'notification-email': { policy: 'stately', retryLimit: 12, retryDelay, retryBackoff: true, expireInSeconds: 120 },
    'daily-digest': { policy: 'stately', retryLimit: 8, retryDelay, retryBackoff: true, expireInSeconds: 30 * 60 },
    'notification-email-sweep': {
      policy: 'stately',
      retryLimit: 1,
      retryDelay,
      retryBackoff: false,
      expireInSeconds: 5 * 60,
    },
    // One waiting and one running job per photo (singleton key upload-<id>); storage outages retry.
    'upload-variants': { policy: 'stately', retryLimit: 8, retryDelay, retryBackoff: true, expireInSeconds: 10 * 60 },
    'uploads-sweep': { policy: 'stately', retryLimit: 1, retryDelay, retryBackoff: false, expireInSeconds: 30 * 60 },
  };
}

/** pg-boss runs its SQL through our pool: one pool to size and close, one database URL. */
const poolAdapter = (pool: pg.Pool): PgBoss.Db => ({ executeSql: (text, values) => pool.query(text, values) });

async function createQueues(boss: PgBoss, specs: Record<JobName, QueueSpec>) {
  for (const [name, spec] of Object.entries(specs)) await boss.createQueue(name, { name, ...spec });
}

export function createJobs(ctx: Omit<AppContext, 'jobs'>, options: JobsOptions = {}): Jobs {
  const workers = options.workers ?? true;
  const schedule = workers && (options.schedule ?? true);
  const pollingIntervalSeconds = options.pollingIntervalSeconds ?? 2;
  const specs = queueSpecs(options);
  const boss = new PgBoss({
    db: poolAdapter(ctx.database.pool),
    schema: SCHEMA,
    supervise: workers,
    schedule,
    migrate: true,
  });
  boss.on('error', (error) => ctx.log.warn(`job queue: ${error.message}`));
  let started = false;

  const jobOptions = (name: JobName): PgBoss.SendOptions => {
    const { retryLimit, retryDelay, retryBackoff, expireInSeconds } = specs[name];
    return { retryLimit, retryDelay, retryBackoff, expireInSeconds };
  };

  const jobs: Jobs = {
    async send(name, data, sendOptions = {}) {
      if (!started) throw new Error(`The job queue is not started: cannot enqueue ${name}.`);
      return boss.send(name, data, {
        ...jobOptions(name),
        ...(sendOptions.singletonKey ? { singletonKey: sendOptions.singletonKey } : {}),
        ...(sendOptions.startAfterSeconds ? { startAfter: sendOptions.startAfterSeconds } : {}),
      });
    },
    async start() {
      if (started) return;
      await boss.start();
      await createQueues(boss, specs);
      started = true;
      if (!workers) return;
      const full: AppContext = { ...ctx, jobs };
      const work = { pollingIntervalSeconds, batchSize: 1 };
      await boss.work<{ notificationId?: unknown }>('notification-email', work, async ([job]) => {
        const id = Number(job!.data.notificationId);
        if (!Number.isInteger(id) || id < 1) {
          ctx.log.warn(`notification-email job ${job!.id} names no notification; dropped`);
          return { outcome: 'invalid' };
        }
        return { outcome: await sendNotificationEmail(full, id) };
      });
      await boss.work('daily-digest', work, async () => runDailyDigest(full));
      await boss.work('notification-email-sweep', work, async () => ({
        queued: await enqueuePendingNotificationEmails(full),
      }));
      await boss.work<{ uploadId?: unknown }>('upload-variants', work, async ([job]) => {
        const id = Number(job!.data.uploadId);
        if (!Number.isInteger(id) || id < 1) {
          ctx.log.warn(`upload-variants job ${job!.id} names no upload; dropped`);
          return { outcome: 'invalid' };
        }
        return { outcome: await processUploadVariants(full, id) };
      });
      await boss.work('uploads-sweep', work, async () => sweepUploads(full));
      if (schedule) {
        await boss.schedule('daily-digest', DAILY_DIGEST_CRON, {}, { tz: 'UTC', ...jobOptions('daily-digest') });
        await boss.schedule(
          'notification-email-sweep',
          SWEEP_CRON,
          {},
          { tz: 'UTC', ...jobOptions('notification-email-sweep') },
        );
        await boss.schedule('uploads-sweep', UPLOADS_SWEEP_CRON, {}, { tz: 'UTC', ...jobOptions('uploads-sweep') });
      }
    },
    async stop() {
      if (!started) return;
      started = false;
      // Lets running handlers finish (up to 10 s); anything still running is failed and retried later.
      await boss.stop({ graceful: true, wait: true, timeout: 10_000 });
    },
  };
  return jobs;
}

/**
 * Installs pg-boss's schema and our queues in a database and leaves nothing running. The
 * test harness does this once in its template database, so every clone starts ready.
 */
export async function installJobSchema(databaseUrl: string): Promise<void> {
  const pool = new pg.Pool({ connectionString: databaseUrl, max: 2 });
  const boss = new PgBoss({ db: poolAdapter(pool), schema: SCHEMA, supervise: false, schedule: false, migrate: true });
  try {
    await boss.start();
    await createQueues(boss, queueSpecs({}));
    await boss.stop({ graceful: false, wait: true });
  } finally {
    await pool.end();
  }
}
