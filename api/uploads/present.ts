/**
 * Upload rows in the contract's shape (shared/contracts/uploads.ts), and the URLs files are
 * served under: `/api/uploads/<id>/original.<ext>` and `/api/uploads/<id>/<variant>.<ext>`.
 * URLs name the upload by id; the storage key (from the content) never leaves the server.
 */
import type { ProjectCover } from '../../shared/contracts/projects';
import type { Upload, Variant, VariantName } from '../../shared/contracts/uploads';
import { variantNames } from '../../shared/contracts/uploads';
import type { uploads } from '../../db/schema';
import { extensionOf } from './types';
import { hiddenOf } from '../moderation/visibility';

export type UploadRow = typeof uploads.$inferSelect;

/** What `uploads.variants` holds for each produced file. */
export interface StoredVariant {
  name: VariantName;
  format: string;
  ext: string;
  width: number;
  height: number;
  bytes: number;
}

/** What `uploads.details` may hold. */
export interface UploadDetails {
  frames?: number;
  /** Digest and size of what the client sent (the stored original is re-encoded). */
  sourceSha256?: string;
  sourceBytes?: number;
  entries?: { name: string; bytes: number; compressedBytes: number }[];
  entriesTruncated?: boolean;
  entryCount?: number;
  declaredBytes?: number;
  failure?: string;
}

/** How wide an image is shown: the reading column, or the whole screen on a phone. */
export const IMAGE_SIZES = '(max-width: 800px) 100vw, 800px';

export const UPLOADS_PATH = '/api/uploads';

export const fileUrl = (id: number, file: string) => `${UPLOADS_PATH}/${id}/${file}`;
export const originalFile = (mime: string) => `original.${extensionOf(mime)}`;
export const originalUrl = (row: Pick<UploadRow, 'id' | 'mime'>) => fileUrl(row.id, originalFile(row.mime));

export const variantsOf = (row: Pick<UploadRow, 'variants'>): StoredVariant[] => (row.variants as StoredVariant[] | null) ?? [];
export const detailsOf = (row: Pick<UploadRow, 'details'>): UploadDetails => (row.details as UploadDetails | null) ?? {};

/** The WebP variants, narrowest first, one per width (a small photo's sizes coincide). */
export function webpVariants(row: Pick<UploadRow, 'variants'>): StoredVariant[] {
  const seen = new Set<number>();
  return variantsOf(row)
    .filter((v) => v.format === 'webp')
    .sort((a, b) => variantNames.indexOf(a.name) - variantNames.indexOf(b.name))
    .filter((v) => (seen.has(v.width) ? false : (seen.add(v.width), true)));
}

export function srcsetOf(row: Pick<UploadRow, 'id' | 'variants'>): string | null {
  const list = webpVariants(row);
  return list.length ? list.map((v) => `${fileUrl(row.id, `${v.name}.${v.ext}`)} ${v.width}w`).join(', ') : null;
}

export function variantFile(row: Pick<UploadRow, 'variants'>, name: VariantName, format = 'webp'): StoredVariant | undefined {
  return variantsOf(row).find((v) => v.name === name && v.format === format);
}

export function toUpload(row: UploadRow, referenced: boolean): Upload {
  const details = detailsOf(row);
  const image = row.kind === 'image';
  const variants: Variant[] = variantsOf(row).map((v) => ({
    name: v.name,
    format: v.format,
    width: v.width,
    height: v.height,
    bytes: v.bytes,
    url: fileUrl(row.id, `${v.name}.${v.ext}`),
  }));
  const srcset = image ? srcsetOf(row) : null;
  return {
    id: row.id,
    kind: row.kind,
    state: row.state,
    mime: row.mime,
    bytes: row.bytes,
    name: row.originalName,
    width: row.width,
    height: row.height,
    altText: row.altText,
    caption: row.caption,
    variants,
    url: originalUrl(row),
    markdownUrl: image ? fileUrl(row.id, 'page.webp') : originalUrl(row),
    srcset,
    sizes: srcset ? IMAGE_SIZES : null,
    entries: details.entries ?? null,
    entriesTruncated: details.entriesTruncated ?? false,
    failure: row.state === 'failed' ? (details.failure ?? 'Processing failed.') : null,
    referenced,
    createdAt: row.createdAt.toISOString(),
    hidden: hiddenOf(row),
  };
}

/** `/api/uploads/12/page.webp` → 12 (app paths only; anything else is not one of ours). */
export function uploadIdOfUrl(url: string): number | null {
  const match = /^\/api\/uploads\/(\d{1,9})\/[a-z]+\.[a-z0-9]+$/.exec(url);
  return match ? Number(match[1]) : null;
}

/** A ready photo as a project's cover (null while it has no page variant). */
export function toCover(row: UploadRow | undefined): ProjectCover | null {
  const page = row ? variantFile(row, 'page') : undefined;
  const srcset = row ? srcsetOf(row) : null;
  if (!row || !page || !srcset) return null;
  return { url: fileUrl(row.id, `page.${page.ext}`), srcset, sizes: IMAGE_SIZES, width: page.width, height: page.height, altText: row.altText };
}
