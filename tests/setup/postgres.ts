/**
 * Global setup for suites that need PostgreSQL: a throwaway cluster in a temporary folder on
 * a free port (never the development database), with a migrated template database (with the
 * job queue's schema installed) that every test file clones (tests/setup/db.ts).
 */
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import pg from 'pg';
import type { TestProject } from 'vitest/node';
import { installJobSchema } from '../../api/jobs/queue';
import { startCluster, type RunningCluster } from '../../db/cluster';
import { migrateDatabase } from '../../db/migrate';

export const TEMPLATE_DB = 'rwb_template';

export async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = net.createServer();
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => {
      const { port } = server.address() as net.AddressInfo;
      server.close(() => resolve(port));
    });
  });
}

declare module 'vitest' {
  export interface ProvidedContext {
    pg: { superuserUrl: string; template: string; dataDir: string; port: number };
  }
}

let cluster: RunningCluster | undefined;
let dir: string | undefined;

export async function setup(project: TestProject) {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'rwb-test-pg-'));
  fs.chmodSync(dir, 0o755);
  const dataDir = path.join(dir, 'data');
  const port = await freePort();
  cluster = startCluster({ dataDir, port, log: () => {} });
  const admin = new pg.Client({ connectionString: cluster.superuserUrl });
  await admin.connect();
  await admin.query(`CREATE DATABASE ${TEMPLATE_DB}`);
  await admin.end();
  const templateUrl = cluster.superuserUrl.replace(/\/postgres$/, `/${TEMPLATE_DB}`);
  await migrateDatabase(templateUrl);
  // The job queue's schema too, once: every clone then starts its queue without installing it.
  await installJobSchema(templateUrl);
  project.provide('pg', { superuserUrl: cluster.superuserUrl, template: TEMPLATE_DB, dataDir, port });
}

export async function teardown() {
  cluster?.stop();
  if (dir) fs.rmSync(dir, { recursive: true, force: true });
}
