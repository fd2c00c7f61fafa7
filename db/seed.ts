/**
 * Demo data: an invented scenario (no real people, projects or brands). `npm start` seeds it
 * into an empty database; `npm run db:seed` does the same on demand.
 */
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { count } from 'drizzle-orm';
import type { Db } from './client';
import { demoAccounts } from './demo/accounts';
import { seedDemoChecks } from './demo/checks';
import { seedDemoContent } from './demo/content';
import { seedParts } from './parts/seed';
import { oauthIdentities, users } from './schema';

export async function seedDemoIfEmpty(db: Db): Promise<boolean> {
  const [row] = await db.select({ n: count() }).from(users);
  if ((row?.n ?? 0) > 0) return false;
  await db.transaction(async (tx) => {
    const ids = new Map<string, number>();
    for (const account of demoAccounts) {
      const [created] = await tx
        .insert(users)
        .values({ handle: account.login, displayName: account.name, email: account.email, role: account.role })
        .returning({ id: users.id });
      ids.set(account.login, created!.id);
      await tx.insert(oauthIdentities).values({
        userId: created!.id,
        provider: 'github',
        providerUserId: String(account.githubId),
        login: account.login,
      });
    }
    // Parts are reference data (the server seeds them at every start too); the demo links to them.
    await seedParts(tx);
    await seedDemoContent(tx, ids);
    await seedDemoChecks(tx, (login) => {
      const id = ids.get(login);
      if (id === undefined) throw new Error(`demo account ${login} missing`);
      return id;
    });
  });
  return true;
}

if (process.argv[1] && fileURLToPath(import.meta.url) === path.resolve(process.argv[1])) {
  const { withDatabaseUrl } = await import('./local');
  const { createDatabase } = await import('./client');
  const { migrateDatabase } = await import('./migrate');
  await withDatabaseUrl(async (url) => {
    await migrateDatabase(url);
    const database = createDatabase(url, { max: 2 });
    try {
      const seeded = await seedDemoIfEmpty(database.db);
      console.log(seeded ? 'Demo data seeded.' : 'The database already has members; nothing seeded.');
    } finally {
      await database.close();
    }
  });
}
