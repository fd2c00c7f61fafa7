import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ensureDatabase, startCluster, type RunningCluster } from '../../db/cluster';
import { migrateDatabase } from '../../db/migrate';
import { createDatabase } from '../../db/client';
import type { TestDatabase } from '../setup/db';
import { createTestApp, type TestApp } from '../setup/app';
import { freePort } from '../setup/postgres';

describe('GET /api/health', () => {
  it('answers ok with the database reachable', async () => {
    const t = await createTestApp({ seed: false });
    const res = await t.agent().get('/api/health').expect(200);
    expect(res.body).toEqual({ status: 'ok', db: 'ok' });
    await t.close();
  });
});

describe('when PostgreSQL stops and comes back', () => {
  // Its own cluster: this test stops the server, which must not disturb other test files.
  let dir: string;
  let dataDir: string;
  let port: number;
  let cluster: RunningCluster;
  let database: TestDatabase;
  let t: TestApp;

  beforeAll(async () => {
    dir = fs.mkdtempSync(path.join(os.tmpdir(), 'rwb-health-'));
    fs.chmodSync(dir, 0o755);
    dataDir = path.join(dir, 'data');
    port = await freePort();
    cluster = startCluster({ dataDir, port, log: () => {} });
    const url = await ensureDatabase(cluster.superuserUrl, { role: 'app', password: 'app', database: 'app' });
    await migrateDatabase(url);
    // The harness runs against this cluster's database instead of a clone of the template.
    const own = createDatabase(url, { max: 4, log: () => {} });
    database = { ...own, url, name: 'app', drop: () => own.close() };
    t = await createTestApp({ database });
  });

  afterAll(async () => {
    await t?.close();
    await database?.close().catch(() => {});
    startCluster({ dataDir, port, log: () => {} }).stop();
    fs.rmSync(dir, { recursive: true, force: true });
  });

  it('reports db down with 503, keeps serving, and recovers', async () => {
    const member = await t.signIn('bram-tolliver');
    expect((await t.agent().get('/api/health')).body).toEqual({ status: 'ok', db: 'ok' });

    cluster.stop();
    // The first search after the outage began: nothing it looked up once may stay failed.
    expect((await t.agent().get('/api/search?q=relay')).status).toBe(503);
    const down = await t.agent().get('/api/health');
    expect(down.status).toBe(503);
    expect(down.body).toEqual({ status: 'degraded', db: 'down' });
    // A request that needs the session store gets the error shape, not a crash.
    const me = await member.agent.get('/api/me');
    expect(me.status).toBe(503);
    expect(me.body.error.code).toBe('service_unavailable');

    cluster = startCluster({ dataDir, port, log: () => {} });
    await expect.poll(async () => (await t.agent().get('/api/health')).status, { timeout: 15_000 }).toBe(200);
    expect((await member.agent.get('/api/me')).body.user.handle).toBe('bram-tolliver');
    expect((await t.agent().get('/api/search?q=relay')).status).toBe(200);
  });
});
