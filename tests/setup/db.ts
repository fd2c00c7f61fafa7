/**
 * Each test file gets its own database, cloned from the migrated template in milliseconds.
 */
import { randomBytes } from 'node:crypto';
import pg from 'pg';
import { inject } from 'vitest';
import { createDatabase, type Database } from '../../db/client';

export interface TestDatabase extends Database {
  url: string;
  name: string;
  drop(): Promise<void>;
}

export async function createTestDatabase(): Promise<TestDatabase> {
  const { superuserUrl, template } = inject('pg');
  const name = `t_${randomBytes(6).toString('hex')}`;
  const admin = new pg.Client({ connectionString: superuserUrl });
  await admin.connect();
  try {
    await admin.query(`CREATE DATABASE ${name} TEMPLATE ${template}`);
  } finally {
    await admin.end();
  }
  const url = superuserUrl.replace(/\/postgres$/, `/${name}`);
  const database = createDatabase(url, { max: 10, log: () => {} });
  return {
    ...database,
    url,
    name,
    async drop() {
      await database.close();
      const client = new pg.Client({ connectionString: superuserUrl });
      await client.connect();
      try {
        await client.query(`DROP DATABASE IF EXISTS ${name} WITH (FORCE)`);
      } finally {
        await client.end();
      }
    },
  };
}
