/**
 * Builds the real app against a test file's own database and a real fake provider on
 * loopback, and signs members in through the real OAuth flow (no shortcut into sessions).
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import request from 'supertest';
import type TestAgent from 'supertest/lib/agent';
import { expect } from 'vitest';
import { createApp } from '../../api/app';
import { loadConfig, type Config } from '../../api/config';
import type { AppContext } from '../../api/context';
import { fakeGithubEndpoints, startFakeGithub, type RunningFakeGithub } from '../../api/fakes/github';
import { startFakeSmtp, type Outbox } from '../../api/fakes/smtp';
import { createJobs } from '../../api/jobs/queue';
import { createLogger } from '../../api/log';
import { createMailer } from '../../api/mail/mailer';
import { FAKE_CLIENT } from '../../api/server';
import { createStorage } from '../../api/storage/storage';
import { seedDemoIfEmpty } from '../../db/seed';
import { createTestDatabase, type TestDatabase } from './db';

export const TEST_ORIGIN = 'http://localhost:3999';

export interface TestApp {
  app: ReturnType<typeof createApp>['app'];
  routes: ReturnType<typeof createApp>['routes'];
  ctx: AppContext;
  database: TestDatabase;
  fake: RunningFakeGithub;
  /** The local mail capture every test app sends to (also `ctx.outbox`). */
  outbox: Outbox;
  config: Config;
  /** A fresh cookie-keeping client, signed out. */
  agent(): TestAgent;
  /** Signs in through the fake provider; the agent then carries the session and CSRF token. */
  signIn(login: string): Promise<SignedInAgent>;
  close(): Promise<void>;
}

export interface SignedInAgent {
  agent: TestAgent;
  csrf: string;
  userId: number;
  /** The session cookie (`rwb.sid=…`) as the callback set it, for replay tests. */
  cookie: string;
  /** Headers every unsafe request needs: same-origin Origin and the CSRF token. */
  headers: Record<string, string>;
}

export async function createTestApp(
  options: {
    env?: Record<string, string>;
    seed?: boolean;
    database?: TestDatabase;
    /** Run the job handlers in this app (delivery tests); off by default: jobs are only stored. */
    workers?: boolean;
  } = {},
): Promise<TestApp> {
  const database = options.database ?? (await createTestDatabase());
  // Each app stores its uploads in its own temporary folder unless the test names one.
  const uploadsDir = options.env?.UPLOADS_DIR ? undefined : fs.mkdtempSync(path.join(os.tmpdir(), 'rwb-test-uploads-'));
  const config = loadConfig({
    NODE_ENV: 'test',
    APP_ORIGIN: TEST_ORIGIN,
    LOG_LEVEL: 'silent',
    SIGN_IN_RATE_PER_MINUTE: '1000',
    ...(uploadsDir ? { UPLOADS_DIR: uploadsDir } : {}),
    ...options.env,
  });
  if (options.seed !== false) await seedDemoIfEmpty(database.db);
  const fake = await startFakeGithub({
    port: 0,
    clientId: FAKE_CLIENT.id,
    clientSecret: FAKE_CLIENT.secret,
    allowedRedirectOrigins: [config.appOrigin],
  });
  const outbox = await startFakeSmtp({ port: 0 });
  const base = {
    config,
    database,
    db: database.db,
    log: createLogger(config.LOG_LEVEL),
    github: fakeGithubEndpoints(fake.url, FAKE_CLIENT.id, FAKE_CLIENT.secret),
    mail: createMailer(config, outbox.url),
    outbox,
    storage: createStorage(config),
  };
  // Schedules stay off (tests call the handlers); retries come quickly so outages are short.
  const jobs = createJobs(base, {
    workers: options.workers ?? false,
    schedule: false,
    retryDelaySeconds: 1,
    pollingIntervalSeconds: 0.5,
  });
  await jobs.start();
  const ctx: AppContext = { ...base, jobs };
  const { app, routes } = createApp(ctx);
  const agent = () => request.agent(app);

  async function signIn(login: string): Promise<SignedInAgent> {
    const a = agent();
    const start = await a.get('/api/auth/github').expect(302);
    const authorize = new URL(start.headers.location as string);
    authorize.searchParams.set('login', login);
    const granted = await fetch(authorize, { redirect: 'manual' });
    expect(granted.status).toBe(302);
    const callback = new URL(granted.headers.get('location')!);
    expect(callback.origin).toBe(config.appOrigin);
    const done = await a.get(callback.pathname + callback.search);
    expect(done.status, `sign-in as ${login} should finish`).toBe(303);
    const cookie = ([] as string[])
      .concat(done.headers['set-cookie'] ?? [])
      .find((c) => c.startsWith('rwb.sid='))
      ?.split(';')[0];
    expect(cookie).toBeDefined();
    const me = await a.get('/api/me').expect(200);
    expect(me.body.user?.handle).toBe(login);
    const csrf = me.body.csrfToken as string;
    return {
      agent: a,
      csrf,
      userId: me.body.user.id as number,
      cookie: cookie!,
      headers: { Origin: config.appOrigin, 'X-CSRF-Token': csrf },
    };
  }

  return {
    app,
    routes,
    ctx,
    database,
    fake,
    outbox,
    config,
    agent,
    signIn,
    async close() {
      await jobs.stop();
      await outbox.close();
      await fake.close();
      base.storage.close?.();
      if (!options.database) await database.drop();
      if (uploadsDir) fs.rmSync(uploadsDir, { recursive: true, force: true });
    },
  };
}
