/**
 * The one PostgreSQL pool and Drizzle instance of a process. A lost server must not crash
 * the API: idle-client errors are logged, and every query simply fails until it is back.
 */
import { drizzle, type NodePgDatabase } from 'drizzle-orm/node-postgres';
import pg from 'pg';
import * as schema from './schema';

export type Schema = typeof schema;
export type Db = NodePgDatabase<Schema>;
/** A transaction handle: the same query API as Db, used by services that compose writes. */
export type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];
export type DbOrTx = Db | Tx;

export interface Database {
  pool: pg.Pool;
  db: Db;
  close(): Promise<void>;
}

// Dates ("YYYY-MM-DD") stay strings: a calendar date has no time zone to shift it.
pg.types.setTypeParser(pg.types.builtins.DATE, (value) => value);

export function createDatabase(url: string, options: { max?: number; log?: (msg: string) => void } = {}): Database {
  const pool = new pg.Pool({
    connectionString: url,
    max: options.max ?? 10,
    connectionTimeoutMillis: 5_000,
    idleTimeoutMillis: 30_000,
    application_name: 'reworkbook',
  });
  pool.on('error', (error) => {
    (options.log ?? console.warn)(`PostgreSQL connection lost: ${error.message}`);
  });
  const db = drizzle({ client: pool, schema, casing: undefined });
  return {
    pool,
    db,
    async close() {
      await pool.end();
    },
  };
}
