/**
 * The background side of uploads:
 *
 * - `upload-variants` (one job per photo, singleton key `upload-<id>`): renders the thumbnail,
 *   page and full sizes from the stored original, writes them under the original's key lock,
 *   marks the row `ready` (or `failed` with the reason, for a photo the decoder rejects) and
 *   touches the project so cached pages pick the new variants up. Idempotent: a row no longer
 *   processing is left alone, and variant files already stored are not written again.
 * - `uploads-sweep` (hourly): removes uploads nothing has referenced for longer than
 *   UPLOAD_GRACE_HOURS — rows first, then the files no row uses any more — re-queues photos
 *   whose variants job was lost, and removes files no row names.
 * - `reconcileUploads` (at startup, before the server listens): brings storage and rows back in
 *   step after a crash or an operator's mistake.
 */
import type { AppContext } from '../context';
import { touchProject } from '../projects/queries';
import { ORIGINALS, VARIANTS, digestOfKey, variantKey } from '../storage/keys';
import { StorageNotFoundError, readAll } from '../storage/port';
import { removeStaleIncoming } from './multipart';
import { renderVariants, type RenderedVariant } from './pipeline';
import { detailsOf, type StoredVariant } from './present';
import * as q from './queries';
import { imagePolicy, queueVariants, removeFilesIfUnused } from './service';
import { IMAGE_KINDS, type ImageMime } from './types';

export const UPLOADS_SWEEP_CRON = '23 * * * *';
/** Files younger than this are never treated as orphans: their row may be about to commit. */
export const ORPHAN_AGE_MS = 60 * 60_000;
/** A photo still processing after this long has lost its job; the sweep queues another. */
export const STUCK_PROCESSING_MS = 10 * 60_000;

export type VariantsOutcome = 'ready' | 'failed' | 'missing' | 'not-processing';

async function fail(ctx: AppContext, id: number, failure: string): Promise<'failed'> {
  const row = await q.findUpload(ctx.db, id);
  if (!row) return 'failed';
  await q.setFailed(ctx.db, id, { ...detailsOf(row), failure });
  if (row.projectId !== null) await touchProject(ctx.db, row.projectId);
  ctx.log.warn(`upload ${id}: ${failure}`);
  return 'failed';
}

export async function processUploadVariants(ctx: AppContext, uploadId: number): Promise<VariantsOutcome> {
  const row = await q.findUpload(ctx.db, uploadId);
  if (!row) return 'missing';
  if (row.state !== 'processing' || row.kind !== 'image') return 'not-processing';
  const format = IMAGE_KINDS[row.mime as ImageMime]?.format;
  if (!format || !row.width) return fail(ctx, uploadId, `cannot make variants of ${row.mime}`);

  let original: Buffer;
  try {
    original = await readAll(ctx.storage, row.storageKey);
  } catch (error) {
    if (error instanceof StorageNotFoundError) return fail(ctx, uploadId, 'The stored original is missing.');
    throw error; // storage unreachable: the queue retries
  }
  let rendered: RenderedVariant[];
  try {
    rendered = await renderVariants(original, format, detailsOf(row).frames ?? 1, row.width, imagePolicy(ctx));
  } catch (error) {
    // The decoder's verdict on these bytes will not change on a retry.
    return fail(ctx, uploadId, `The photo could not be resized (${(error as Error).message.split('\n')[0]}).`);
  }

  const done = await ctx.db.transaction(async (tx) => {
    await q.lockStorageKey(tx, row.storageKey);
    const current = await q.lockUpload(tx, uploadId);
    if (!current || current.state !== 'processing') return false;
    const variants: StoredVariant[] = [];
    for (const variant of rendered) {
      const key = variantKey(current.sha256, `${variant.name}.${variant.ext}`);
      if (!(await ctx.storage.exists(key))) await ctx.storage.put(key, variant.data, `image/${variant.format}`);
      const { data, ...rest } = variant;
      variants.push({ ...rest, bytes: data.length });
    }
    await q.setProcessed(tx, uploadId, { variants, width: current.width ?? 0, height: current.height ?? 0, details: detailsOf(current) });
    if (current.projectId !== null) await touchProject(tx, current.projectId);
    return true;
  });
  return done ? 'ready' : 'not-processing';
}

export interface SweepReport {
  /** Upload rows removed (unreferenced past the grace period). */
  removed: number;
  /** Originals removed with their variants because no row used them any more. */
  files: number;
  requeued: number;
  orphanFiles: number;
}

export async function sweepUploads(ctx: AppContext, now = new Date()): Promise<SweepReport> {
  const cutoff = new Date(now.getTime() - ctx.config.uploadLimits.graceMs);
  const deleted = await ctx.db.transaction((tx) => q.deleteUnreferencedBefore(tx, cutoff));
  let files = 0;
  for (const sha of new Set(deleted.map((r) => r.sha256))) if (await removeFilesIfUnused(ctx, sha)) files++;
  const stuck = await q.processingIds(ctx.db, new Date(now.getTime() - STUCK_PROCESSING_MS));
  for (const id of stuck) await queueVariants(ctx, id);
  const orphanFiles = await removeOrphanFiles(ctx, now);
  await q.repairMarkers(ctx.db);
  if (deleted.length) ctx.log.info(`removed ${deleted.length} upload(s) no content used for ${ctx.config.UPLOAD_GRACE_HOURS} h`);
  return { removed: deleted.length, files, requeued: stuck.length, orphanFiles };
}

/** Originals and variants no row names, older than ORPHAN_AGE_MS. */
export async function removeOrphanFiles(ctx: AppContext, now = new Date()): Promise<number> {
  const rows = await q.allStorageRows(ctx.db);
  const inUse = new Set(rows.map((r) => r.sha256));
  const cutoff = new Date(now.getTime() - ORPHAN_AGE_MS);
  const handled = new Set<string>();
  let removed = 0;
  for (const prefix of [ORIGINALS, VARIANTS]) {
    for await (const key of ctx.storage.list(prefix)) {
      const sha = digestOfKey(key);
      // Keys we never write are not ours to remove.
      if (!sha || inUse.has(sha) || handled.has(sha)) continue;
      const stat = await ctx.storage.stat(key);
      if (!stat || stat.modifiedAt > cutoff) continue;
      handled.add(sha);
      if (await removeFilesIfUnused(ctx, sha)) removed++;
    }
  }
  if (removed) ctx.log.info(`removed the files of ${removed} upload(s) no row named`);
  return removed;
}

export interface ReconcileReport {
  /** Rows whose original was missing: marked failed (still referenced) or removed. */
  missingFailed: number;
  missingRemoved: number;
  orphanFiles: number;
  temporaryFiles: number;
  requeued: number;
}

export async function reconcileUploads(ctx: AppContext, now = new Date()): Promise<ReconcileReport> {
  const present = new Set<string>();
  for await (const key of ctx.storage.list(ORIGINALS)) present.add(key);
  const rows = await q.allStorageRows(ctx.db);
  const missing: typeof rows = [];
  // Checked once more one by one: a file written after the listing is not missing.
  for (const row of rows) if (!present.has(row.storageKey) && !(await ctx.storage.exists(row.storageKey))) missing.push(row);
  const toRemove = missing.filter((r) => !r.referenced).map((r) => r.id);
  const toFail = missing.filter((r) => r.referenced && r.state !== 'failed').map((r) => r.id);
  await q.deleteRows(ctx.db, toRemove);
  await q.markMissing(ctx.db, toFail, 'The stored file is missing.');
  for (const id of toFail) {
    const row = await q.findUpload(ctx.db, id);
    if (row?.projectId) await touchProject(ctx.db, row.projectId);
  }

  const orphanFiles = await removeOrphanFiles(ctx, now);
  const stale = new Date(now.getTime() - ORPHAN_AGE_MS);
  const temporaryFiles = (await ctx.storage.removeStaleTemporaryFiles(stale)) + (await removeStaleIncoming(ctx.config, stale));
  const processing = await q.processingIds(ctx.db);
  for (const id of processing) await queueVariants(ctx, id);
  await q.repairMarkers(ctx.db);
  const report = { missingFailed: toFail.length, missingRemoved: toRemove.length, orphanFiles, temporaryFiles, requeued: processing.length };
  if (missing.length || orphanFiles || temporaryFiles) ctx.log.warn(`uploads reconciled with ${ctx.storage.description}: ${JSON.stringify(report)}`);
  return report;
}
