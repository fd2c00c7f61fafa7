/**
 * Uploads: taking files in, listing, changing and removing them, and serving them.
 *
 * Taking a file in, in this order:
 * 1. the type from its bytes (types.ts), its size against that type's limit, the member's quota;
 * 2. photos: header check, decode, upright, metadata stripped, re-encoded (pipeline.ts); ZIPs:
 *    listed, bombs refused (zip.ts);
 * 3. in one transaction: the quota checked again under a per-member lock, each file written to
 *    storage under its content key (skipped when already there: identical files are stored once)
 *    while holding that key's lock, then the rows. A crash between the two leaves a file no row
 *    names, which the reconcile removes; never a row pointing at nothing;
 * 4. after the commit, photos get an `upload-variants` job; the request answers at once.
 *
 * All files of a request succeed or none does.
 */
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import { pipeline } from 'node:stream/promises';
import type { Request, Response } from 'express';
import type { Upload, UploadList } from '../../shared/contracts/uploads';
import { updateUploadSchema, variantNames } from '../../shared/contracts/uploads';
import type { AuthUser } from '../http/routes';
import type { AppContext } from '../context';
import { AppError, fail } from '../http/errors';
import type { ProjectRow } from '../projects/queries';
import { touchProject } from '../projects/queries';
import { originalKey, variantKey, variantPrefix } from '../storage/keys';
import { StorageNotFoundError } from '../storage/port';
import type { ProjectRole } from '../../shared/domain';
import type { IncomingUpload } from './multipart';
import { safeDisplayName, contentDisposition } from './names';
import { MAX_FRAMES, inspectImage, normalizeImage, type ImagePolicy } from './pipeline';
import { originalFile, toUpload, variantsOf, type UploadDetails, type UploadRow } from './present';
import * as q from './queries';
import { replaceUploadRefs } from './refs';
import { servedContentType, sniffFile, type FileKind } from './types';
import { listZip } from './zip';

export const imagePolicy = (ctx: AppContext): ImagePolicy => ({ maxPixels: ctx.config.uploadLimits.maxPixels, maxFrames: MAX_FRAMES });

export const variantsJobKey = (uploadId: number) => `upload-${uploadId}`;

/** Besides the bytes, a member may keep this many uploads (OWASP ASVS 5.0 requirement 5.2.4). */
export const MAX_UPLOADS_PER_MEMBER = 5_000;

const mib = (bytes: number) => `${(bytes / 1024 / 1024).toLocaleString('en', { maximumFractionDigits: 1 })} MB`;

interface PreparedFile {
  kind: FileKind;
  name: string;
  /** Photos: the re-encoded original; attachments: the received file, copied as is. */
  content: { buffer: Buffer } | { path: string };
  bytes: number;
  sha256: string;
  width: number | null;
  height: number | null;
  details: UploadDetails;
}

async function sha256OfFile(file: string): Promise<string> {
  const hash = createHash('sha256');
  await pipeline(fs.createReadStream(file), hash);
  return hash.digest('hex');
}

/**
 * The per-member quota: bytes of stored originals and number of uploads (OWASP ASVS 5.0
 * requirement 5.2.4: one member cannot fill the storage).
 */
function checkQuota(usage: { bytes: number; files: number }, incoming: { bytes: number; files: number }, limit: number): void {
  if (usage.bytes + incoming.bytes > limit) throw quotaError(usage.bytes, incoming.bytes, limit);
  if (usage.files + incoming.files > MAX_UPLOADS_PER_MEMBER) {
    throw new AppError(
      'payload_too_large',
      `You have ${usage.files.toLocaleString('en')} uploads; at most ${MAX_UPLOADS_PER_MEMBER.toLocaleString('en')} are allowed. Remove files you no longer use from your projects' galleries.`,
      { files: usage.files, limitFiles: MAX_UPLOADS_PER_MEMBER },
    );
  }
}

function quotaError(used: number, incoming: number, limit: number): AppError {
  return new AppError(
    'payload_too_large',
    `Your uploads use ${mib(used)} of your ${mib(limit)}; this would add ${mib(incoming)}. Remove files you no longer use from your projects' galleries to make room.`,
    { usedBytes: used, incomingBytes: incoming, limitBytes: limit },
  );
}

async function prepare(ctx: AppContext, file: Express.Multer.File): Promise<PreparedFile> {
  const limits = ctx.config.uploadLimits;
  const kind = await sniffFile(file.path, file.originalname, file.size);
  const name = safeDisplayName(file.originalname, kind.extensions, kind.kind === 'image' ? 'photo' : 'file');
  const limit = kind.kind === 'image' ? limits.imageBytes : limits.attachmentBytes;
  if (file.size > limit) {
    throw new AppError(
      'payload_too_large',
      `${kind.kind === 'image' ? 'Photos' : 'Files of this type'} may be at most ${mib(limit)}; “${name}” is ${mib(file.size)}.`,
      { limitBytes: limit, bytes: file.size },
    );
  }
  if (kind.kind === 'image') {
    const policy = imagePolicy(ctx);
    const inspected = await inspectImage(file.path, kind.format!, policy);
    const image = await normalizeImage(file.path, inspected, policy);
    return {
      kind,
      name,
      content: { buffer: image.data },
      bytes: image.data.length,
      sha256: createHash('sha256').update(image.data).digest('hex'),
      width: image.width,
      height: image.height,
      details: { frames: image.frames, sourceBytes: file.size, sourceSha256: await sha256OfFile(file.path) },
    };
  }
  const details: UploadDetails = {};
  if (kind.mime === 'application/zip') Object.assign(details, await listZip(file.path));
  return { kind, name, content: { path: file.path }, bytes: file.size, sha256: await sha256OfFile(file.path), width: null, height: null, details };
}

function textFields(fields: Record<string, unknown>): { altText: string; caption: string } {
  const parsed = updateUploadSchema.safeParse(fields);
  if (!parsed.success) {
    throw new AppError('validation_failed', 'The form fields are not valid (only altText and caption may come with files).', {
      issues: parsed.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message })),
    });
  }
  return { altText: parsed.data.altText ?? '', caption: parsed.data.caption ?? '' };
}

export async function uploadFiles(ctx: AppContext, user: AuthUser, project: ProjectRow, incoming: IncomingUpload): Promise<{ items: Upload[] }> {
  if (!incoming.files.length) throw fail.badRequest('Choose at least one file to upload (form field "file").');
  const texts = textFields(incoming.fields);
  const quota = ctx.config.uploadLimits.quotaBytes;
  // Refused before any work when the files as sent cannot fit.
  const received = incoming.files.reduce((total, f) => total + f.size, 0);
  checkQuota(await q.usageOf(ctx.db, user.id), { bytes: received, files: incoming.files.length }, quota);

  const prepared: PreparedFile[] = [];
  for (const file of incoming.files) prepared.push(await prepare(ctx, file));

  const rows = await ctx.db.transaction(async (tx) => {
    await q.lockQuota(tx, user.id);
    const adding = prepared.reduce((total, p) => total + p.bytes, 0);
    checkQuota(await q.usageOf(tx, user.id), { bytes: adding, files: prepared.length }, quota);
    // Keys are locked in one order, so two requests sharing files cannot deadlock.
    const byKey = new Map(prepared.map((p) => [originalKey(p.sha256), p]));
    for (const key of [...byKey.keys()].sort()) {
      await q.lockStorageKey(tx, key);
      if (await ctx.storage.exists(key)) continue;
      const p = byKey.get(key)!;
      await ctx.storage.put(key, 'buffer' in p.content ? p.content.buffer : fs.createReadStream(p.content.path), p.kind.mime);
    }
    const inserted: UploadRow[] = [];
    for (const p of prepared) {
      // The same photo already processed: its variants are the same files, so it is ready at once.
      const twin = p.kind.kind === 'image' ? await q.readyTwin(tx, p.sha256) : undefined;
      inserted.push(
        await q.insertUpload(tx, {
          sha256: p.sha256,
          ownerId: user.id,
          projectId: project.id,
          kind: p.kind.kind,
          state: p.kind.kind === 'attachment' || twin ? 'ready' : 'processing',
          mime: p.kind.mime,
          bytes: p.bytes,
          width: p.width,
          height: p.height,
          originalName: p.name,
          altText: p.kind.kind === 'image' ? texts.altText : '',
          caption: texts.caption,
          storageKey: originalKey(p.sha256),
          variants: twin ? variantsOf(twin) : [],
          details: p.details,
          // Nothing uses a new upload yet: it is swept after the grace period unless content does.
          unreferencedSince: new Date(),
        }),
      );
    }
    return inserted;
  });

  for (const row of rows) if (row.state === 'processing') await queueVariants(ctx, row.id);
  return { items: rows.map((row) => toUpload(row, false)) };
}

/** Enqueues the variants job; a lost enqueue is recovered by the sweep and the startup reconcile. */
export async function queueVariants(ctx: AppContext, uploadId: number): Promise<void> {
  try {
    await ctx.jobs.send('upload-variants', { uploadId }, { singletonKey: variantsJobKey(uploadId) });
  } catch (error) {
    ctx.log.warn(`could not queue variants of upload ${uploadId} (the sweep will): ${(error as Error).message}`);
  }
}

// --- reading and changing ----------------------------------------------------------------------

export async function presentOne(ctx: AppContext, row: UploadRow): Promise<Upload> {
  return toUpload(row, (await q.referencedIds(ctx.db, [row.id])).has(row.id));
}

export async function galleryOf(ctx: AppContext, project: ProjectRow, role: ProjectRole | null, user: AuthUser | null): Promise<UploadList> {
  const rows = await q.listProjectUploads(ctx.db, project.id, role !== null);
  const referenced = await q.referencedIds(
    ctx.db,
    rows.map((r) => r.id),
  );
  return {
    items: rows.map((row) => toUpload(row, referenced.has(row.id))),
    quota: { usedBytes: user ? (await q.usageOf(ctx.db, user.id)).bytes : 0, limitBytes: ctx.config.uploadLimits.quotaBytes },
  };
}

export async function updateTexts(ctx: AppContext, upload: UploadRow, input: { altText?: string; caption?: string }): Promise<Upload> {
  const values = {
    ...(input.altText !== undefined && upload.kind === 'image' ? { altText: input.altText } : {}),
    ...(input.caption !== undefined ? { caption: input.caption } : {}),
  };
  if (input.altText !== undefined && upload.kind !== 'image') {
    throw fail.validation('Only photos have alt text.', { issues: [{ path: 'altText', message: 'not for attachments' }] });
  }
  const row = Object.keys(values).length ? await q.updateTexts(ctx.db, upload.id, values) : upload;
  if (!row) throw fail.notFound('The file');
  // Alt text shows in the rendered pages: their caches key on the project's change counter.
  if (upload.projectId !== null) await touchProject(ctx.db, upload.projectId);
  return presentOne(ctx, row);
}

/**
 * Removes an upload nothing uses (409 while content or the cover still does): the row, then its
 * files if no other row shares them.
 */
export async function removeUpload(ctx: AppContext, upload: UploadRow): Promise<void> {
  await ctx.db.transaction(async (tx) => {
    const row = await q.lockUpload(tx, upload.id);
    if (!row) throw fail.notFound('The file');
    if ((await q.referencedIds(tx, [row.id])).has(row.id)) {
      throw fail.conflict('This file is still used by the write-up, errata, lessons or as the cover photo. Remove it there first.');
    }
    await q.deleteUploadRow(tx, row.id);
  });
  await removeFilesIfUnused(ctx, upload.sha256);
  if (upload.projectId !== null) await touchProject(ctx.db, upload.projectId);
}

/** Deletes an original and its variants unless a row still names them (under the key's lock). */
export async function removeFilesIfUnused(ctx: AppContext, sha256: string): Promise<boolean> {
  const key = originalKey(sha256);
  return ctx.db.transaction(async (tx) => {
    await q.lockStorageKey(tx, key);
    if (await q.keyInUse(tx, key)) return false;
    for await (const variant of ctx.storage.list(variantPrefix(sha256))) await ctx.storage.delete(variant);
    await ctx.storage.delete(key);
    return true;
  });
}

export async function setCoverPhoto(ctx: AppContext, project: ProjectRow, uploadId: number | null): Promise<void> {
  if (uploadId !== null) {
    const upload = await q.findUpload(ctx.db, uploadId);
    if (!upload || upload.projectId !== project.id || upload.kind !== 'image' || upload.state !== 'ready' || upload.hiddenAt) {
      throw fail.validation('Choose a photo of this project that has finished processing.', {
        issues: [{ path: 'uploadId', message: 'not a ready photo of this project' }],
      });
    }
  }
  await ctx.db.transaction(async (tx) => {
    await q.setCover(tx, project.id, uploadId);
    await replaceUploadRefs(tx, 'project_cover', project.id, project.id, uploadId === null ? [] : [uploadId]);
    await touchProject(tx, project.id);
  });
}

// --- serving -----------------------------------------------------------------------------------

const FILE_NAME = /^(original|thumb|page|full)\.([a-z0-9]{2,5})$/;

interface ServedFile {
  key: string;
  mime: string;
  bytes: number;
  downloadName: string;
}

function resolveFile(upload: UploadRow, file: string): ServedFile | null {
  const match = FILE_NAME.exec(file);
  if (!match) return null;
  const [, name, ext] = match;
  if (name === 'original') {
    if (file !== originalFile(upload.mime)) return null;
    return { key: upload.storageKey, mime: upload.mime, bytes: upload.bytes, downloadName: upload.originalName };
  }
  if (!(variantNames as readonly string[]).includes(name!)) return null;
  const variant = variantsOf(upload).find((v) => v.name === name && v.ext === ext);
  if (!variant) return null;
  const stem = upload.originalName.replace(/\.[^.]+$/, '');
  return {
    key: variantKey(upload.sha256, file),
    mime: `image/${variant.format}`,
    bytes: variant.bytes,
    downloadName: `${stem}-${name}.${ext}`,
  };
}

/**
 * Streams one file. Images inline, everything else as a download; the type is the sniffed one,
 * `nosniff` stops browsers from guessing another, and the response's own CSP allows nothing, so a
 * file opened directly can never run anything in our origin.
 *
 * OWASP File Upload Cheat Sheet: "use a handler that gets mapped to filenames inside the
 * application (someid -> file.ext)"; OWASP ASVS 5.0 requirements 5.4.1 and 5.4.2 (the server names
 * the file, encoded per RFC 6266) and 3.2.1 (no rendering in the wrong context: attachment
 * disposition, a sandboxing CSP).
 */
export async function serveFile(
  ctx: AppContext,
  req: Request,
  res: Response,
  upload: UploadRow,
  project: ProjectRow,
  file: string,
): Promise<void> {
  const served = resolveFile(upload, file);
  if (!served) throw fail.notFound('The file');
  const isImage = upload.kind === 'image';
  const isPublic = project.status === 'published' && !project.hiddenAt && !upload.hiddenAt;
  res.set({
    'Content-Type': servedContentType(served.mime),
    'X-Content-Type-Options': 'nosniff',
    'Content-Security-Policy': "default-src 'none'; sandbox",
    'Content-Disposition': contentDisposition(isImage ? 'inline' : 'attachment', served.downloadName),
    // A file under a URL never changes (its content is addressed by digest), so caching is safe;
    // drafts stay in the viewer's own browser, and published files expire within the hour so an
    // unpublished or hidden project stops being served by shared caches soon after.
    'Cache-Control': isPublic ? 'public, max-age=3600' : 'private, max-age=300',
    ETag: `"${upload.sha256}.${file}"`,
  });
  if (req.fresh) {
    res.status(304).end();
    return;
  }
  let stored;
  try {
    stored = await ctx.storage.get(served.key);
  } catch (error) {
    if (error instanceof StorageNotFoundError) {
      ctx.log.warn(`upload ${upload.id}: ${served.key} is missing from storage`);
      throw fail.notFound('The file');
    }
    throw error;
  }
  res.set('Content-Length', String(stored.bytes));
  if (req.method === 'HEAD') {
    stored.body.destroy();
    res.status(200).end();
    return;
  }
  res.status(200);
  try {
    await pipeline(stored.body, res);
  } catch (error) {
    // The reader went away mid-download: nothing to answer, nothing to log as a fault.
    if ((error as NodeJS.ErrnoException).code === 'ERR_STREAM_PREMATURE_CLOSE' || res.destroyed) return;
    throw error;
  }
}
