/**
 * `npm run search:reindex`: rebuild every search document from the source tables — PostgreSQL's
 * index always, and Meilisearch's too when MEILISEARCH_URL is set. For a new Meilisearch server,
 * after changing what documents hold, or after rows were changed behind the outbox's back.
 *
 * Searches keep working while it runs but find less until it ends: both indexes are emptied
 * first. A server running at the same time is fine (its indexer claims batches from the same
 * outbox and feeds the same backends).
 */
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { sql } from 'drizzle-orm';
import type { AppContext } from '../context';
import type { SearchBackend } from './backend';
import { indexPending, queueEverything } from './indexer';
import { MeilisearchSearch, createSearchBackend } from './meilisearch';

export interface ReindexReport {
  /** Outbox rows processed (every item, plus the children a project's change queued again). */
  processed: number;
  /** Documents in PostgreSQL's index afterwards, per kind. */
  postgres: Record<string, number>;
  /** The secondary backend and how many documents it holds afterwards (when it can say). */
  secondary: { name: string; documents: number | null } | null;
}

/** Queue everything, empty both indexes, and drain the outbox into them. */
export async function reindexEverything(ctx: AppContext, secondary: SearchBackend | null): Promise<ReindexReport> {
  // indexPending only logs a batch the secondary refused (and queues it again): notice it here.
  const seen: { refused: Error | null } = { refused: null };
  const refusing = <T>(work: Promise<T>) =>
    work.catch((error: unknown) => {
      seen.refused = error as Error;
      throw error;
    });
  const watched: SearchBackend | null = secondary && {
    name: secondary.name,
    upsert: (docs) => refusing(secondary.upsert(docs)),
    remove: (refs) => refusing(secondary.remove(refs)),
    search: (query, viewer) => secondary.search(query, viewer),
    clear: () => secondary.clear(),
  };

  // The secondary first: if it is unreachable, nothing has been emptied yet.
  if (secondary) await secondary.clear();
  await queueEverything(ctx, { clear: true });
  let processed = 0;
  for (;;) {
    const claimed = await indexPending(ctx, { secondary: watched });
    processed += claimed;
    if (seen.refused) {
      throw new Error(
        `${secondary!.name} refused a batch (${seen.refused.message}); its items are queued again, so the server's indexer or the next reindex will retry them.`,
        { cause: seen.refused },
      );
    }
    if (claimed === 0) break;
  }

  const rows = await ctx.db.execute<{ kind: string; n: number }>(
    sql`SELECT kind, count(*)::int AS n FROM search_docs GROUP BY kind ORDER BY kind`,
  );
  return {
    processed,
    postgres: Object.fromEntries(rows.rows.map((r) => [r.kind, Number(r.n)])),
    secondary: secondary
      ? {
          name: secondary.name,
          documents: secondary instanceof MeilisearchSearch ? await secondary.documentCount() : null,
        }
      : null,
  };
}

if (process.argv[1] && fileURLToPath(import.meta.url) === path.resolve(process.argv[1])) {
  const { withDatabaseUrl } = await import('../../db/local');
  const { createDatabase } = await import('../../db/client');
  const { migrateDatabase } = await import('../../db/migrate');
  const { createLogger } = await import('../log');
  try {
    await withDatabaseUrl(async (url, config) => {
      await migrateDatabase(url);
      const database = createDatabase(url, { max: 2 });
      try {
        // The indexer reads only the database and the logger of the context, not the whole app.
        const ctx = { config, database, db: database.db, log: createLogger(config.LOG_LEVEL) } as unknown as AppContext;
        const report = await reindexEverything(ctx, createSearchBackend(config));
        const postgresTotal = Object.values(report.postgres).reduce((a, b) => a + b, 0);
        const perKind = Object.entries(report.postgres)
          .map(([kind, n]) => `${kind} ${n}`)
          .join(', ');
        console.log(`Search reindexed: ${report.processed} queued items processed.`);
        console.log(`PostgreSQL index: ${postgresTotal} documents (${perKind || 'none'}).`);
        if (report.secondary)
          console.log(`${report.secondary.name} index: ${report.secondary.documents ?? 'unknown'} documents.`);
        else console.log('MEILISEARCH_URL is not set: PostgreSQL answers searches.');
      } finally {
        await database.close();
      }
    });
  } catch (error) {
    console.error(`The reindex did not finish: ${(error as Error).message}`);
    process.exitCode = 1;
  }
}
