/**
 * The indexer: drains the search outbox (filled by triggers in the same transaction as every
 * write to a searchable table) and rebuilds the affected search documents. Rows are claimed
 * with SKIP LOCKED, so any number of API processes can run it; a batch is processed in the
 * transaction that claimed it, so a crash puts its rows back.
 */
import { sql } from 'drizzle-orm';
import type { Db, Tx } from '../../db/client';
import type { AppContext } from '../context';
import type { SearchBackend } from './backend';
import {
  buildDocuments,
  buildErrata,
  buildLessons,
  buildProjects,
  buildTags,
  buildParts,
  childrenOfProjects,
  itemsWithTags,
  type OutboxKind,
  type SearchDocument,
} from './documents';
import { PostgresSearch } from './postgres';

export const BATCH = 500;

type Ref = { kind: SearchDocument['kind']; refId: number };

async function enqueue(tx: Tx, kind: OutboxKind, ids: number[]) {
  if (!ids.length) return;
  await tx.execute(sql`
    INSERT INTO search_outbox (kind, ref_id)
    SELECT ${kind}, id::int FROM jsonb_array_elements_text(${JSON.stringify(ids)}::jsonb) AS t(id)`);
}

/** One batch: claim, rebuild, write. Returns what changed, for a secondary backend. */
async function processBatch(tx: Tx, limit: number): Promise<{ claimed: number; upserts: SearchDocument[]; removals: Ref[] }> {
  const claimed = await tx.execute<{ kind: OutboxKind; ref_id: number }>(sql`
    DELETE FROM search_outbox WHERE id IN (
      SELECT id FROM search_outbox ORDER BY id LIMIT ${limit} FOR UPDATE SKIP LOCKED
    ) RETURNING kind, ref_id`);
  if (!claimed.rows.length) return { claimed: 0, upserts: [], removals: [] };
  const ids = (kind: OutboxKind) => [...new Set(claimed.rows.filter((r) => r.kind === kind).map((r) => Number(r.ref_id)))];
  const projectIds = ids('project');
  const tagIds = ids('tag');

  // A project's title and visibility are on every item of it: re-queue them when either changed.
  if (projectIds.length) {
    const before = await tx.execute<{ ref_id: number; visible: boolean; project_title: string | null }>(sql`
      SELECT ref_id, visible, project_title FROM search_docs
      WHERE kind = 'project' AND ref_id IN (SELECT (jsonb_array_elements_text(${JSON.stringify(projectIds)}::jsonb))::int)`);
    const built = await buildProjects(tx, projectIds);
    const changed = projectIds.filter((id) => {
      const old = before.rows.find((r) => Number(r.ref_id) === id);
      const now = built.get(id);
      return !old || !now || old.visible !== now.visible || old.project_title !== now.projectTitle;
    });
    const children = await childrenOfProjects(tx, changed);
    await enqueue(tx, 'document', children.documents);
    await enqueue(tx, 'erratum', children.errata);
    await enqueue(tx, 'lesson', children.lessons);
  }
  if (tagIds.length) {
    const items = await itemsWithTags(tx, tagIds);
    await enqueue(tx, 'erratum', items.errata);
    await enqueue(tx, 'lesson', items.lessons);
  }

  const results: Array<[OutboxKind, Map<number, SearchDocument | null>]> = [
    ['project', await buildProjects(tx, projectIds)],
    ['document', await buildDocuments(tx, ids('document'))],
    ['erratum', await buildErrata(tx, ids('erratum'))],
    ['lesson', await buildLessons(tx, ids('lesson'))],
    ['tag', await buildTags(tx, tagIds)],
    ['part', await buildParts(tx, ids('part'))],
  ];
  const upserts: SearchDocument[] = [];
  const removals: Ref[] = [];
  for (const [kind, built] of results) {
    for (const [refId, doc] of built) {
      if (doc) upserts.push(doc);
      else if (kind === 'document') removals.push({ kind: 'section', refId }, { kind: 'log_entry', refId });
      else removals.push({ kind: kind as SearchDocument['kind'], refId });
    }
  }
  const pg = new PostgresSearch(tx as unknown as Db);
  // A section that became a log entry (or back) must not stay under its old kind.
  const moved = upserts.filter((d) => d.kind === 'section' || d.kind === 'log_entry').map((d) => ({ kind: d.kind === 'section' ? ('log_entry' as const) : ('section' as const), refId: d.refId }));
  await pg.remove([...removals, ...moved]);
  await pg.upsert(upserts);
  return { claimed: claimed.rows.length, upserts, removals };
}

/**
 * Drain the outbox. `secondary` (Meilisearch) gets the same changes after each batch commits;
 * if it fails, the batch's items are queued again so nothing is lost.
 */
export async function indexPending(ctx: AppContext, options: { secondary?: SearchBackend | null; maxBatches?: number } = {}): Promise<number> {
  let total = 0;
  for (let i = 0; i < (options.maxBatches ?? 1000); i++) {
    const batch = await ctx.db.transaction((tx) => processBatch(tx, BATCH));
    total += batch.claimed;
    if (options.secondary && (batch.upserts.length || batch.removals.length)) {
      try {
        await options.secondary.remove(batch.removals);
        await options.secondary.upsert(batch.upserts);
      } catch (error) {
        ctx.log.warn(`search: the secondary index refused a batch; it will be retried: ${(error as Error).message}`);
        await ctx.db.transaction(async (tx) => {
          for (const kind of ['project', 'document', 'erratum', 'lesson', 'tag', 'part'] as const) {
            const kinds = kind === 'document' ? ['section', 'log_entry'] : [kind];
            await enqueue(tx, kind, [...batch.upserts, ...batch.removals].filter((d) => kinds.includes(d.kind)).map((d) => d.refId));
          }
        });
        break;
      }
    }
    if (batch.claimed === 0) break;
  }
  return total;
}

/** Queue every searchable item (full reindex), optionally after clearing the index. */
export async function queueEverything(ctx: AppContext, options: { clear?: boolean } = {}): Promise<void> {
  await ctx.db.transaction(async (tx) => {
    if (options.clear) await tx.execute(sql`TRUNCATE search_docs, search_terms`);
    await tx.execute(sql`
      INSERT INTO search_outbox (kind, ref_id)
      SELECT 'project', id FROM projects UNION ALL SELECT 'document', id FROM documents
      UNION ALL SELECT 'erratum', id FROM errata UNION ALL SELECT 'lesson', id FROM lessons
      UNION ALL SELECT 'tag', id FROM tags UNION ALL SELECT 'part', id FROM parts`);
  });
}

/** Poll the outbox about once a second in this process; the returned stop waits for a run in flight. */
export function startSearchIndexer(ctx: AppContext, secondary: SearchBackend | null = null, everyMs = 1000): () => Promise<void> {
  let current: Promise<void> | null = null;
  let stopped = false;
  const tick = () => {
    if (current || stopped) return;
    current = indexPending(ctx, { secondary })
      .then(() => undefined)
      .catch((error: unknown) => ctx.log.warn(`search indexer: ${(error as Error).message}`))
      .finally(() => {
        current = null;
      });
  };
  const timer = setInterval(tick, everyMs);
  timer.unref();
  tick();
  return async () => {
    stopped = true;
    clearInterval(timer);
    await current;
  };
}
