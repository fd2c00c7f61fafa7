/**
 * Applies the committed migrations. `npm run db:migrate` runs it against DATABASE_URL or the
 * embedded cluster; `npm start` and the test harness call `migrateDatabase` directly.
 */
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { migrate } from 'drizzle-orm/node-postgres/migrator';
import { createDatabase } from './client';

export const migrationsFolder = path.join(path.dirname(fileURLToPath(import.meta.url)), 'migrations');

export async function migrateDatabase(url: string): Promise<void> {
  const database = createDatabase(url, { max: 1 });
  try {
    await migrate(database.db, { migrationsFolder });
  } finally {
    await database.close();
  }
}

if (process.argv[1] && fileURLToPath(import.meta.url) === path.resolve(process.argv[1])) {
  const { withDatabaseUrl } = await import('./local');
  await withDatabaseUrl(async (url) => {
    await migrateDatabase(url);
    console.log('Migrations applied.');
  });
}
