/**
 * The photos a page's Markdown shows, resolved in one query, for `renderMarkdown`'s `images`
 * option: a ready photo is drawn from its WebP variants (srcset, sizes, page width and height),
 * one still processing from its stripped original, and anything else — another project's
 * upload, a failed or hidden one, an attachment — is not in the map (the renderer shows its
 * alt text instead).
 */
import type { DbOrTx } from '../../db/client';
import type { MarkdownImage } from '../markdown/render';
import { IMAGE_SIZES, fileUrl, originalUrl, srcsetOf, variantFile, type UploadRow } from './present';
import { showableImages } from './queries';

export type ImageMap = ReadonlyMap<string, MarkdownImage>;

export const NO_IMAGES: ImageMap = new Map();

const MENTIONED = /\/api\/uploads\/(\d{1,9})\//g;

export function markdownImageOf(row: UploadRow): MarkdownImage {
  const page = row.state === 'ready' ? variantFile(row, 'page') : undefined;
  const srcset = page ? srcsetOf(row) : null;
  return page
    ? { src: fileUrl(row.id, `page.${page.ext}`), srcset, sizes: srcset ? IMAGE_SIZES : null, width: page.width, height: page.height, alt: row.altText }
    : { src: originalUrl(row), srcset: null, sizes: null, width: row.width, height: row.height, alt: row.altText };
}

export async function imagesForMarkdown(db: DbOrTx, markdowns: readonly string[], projectId: number): Promise<ImageMap> {
  const ids = new Set<number>();
  for (const markdown of markdowns) for (const match of markdown.matchAll(MENTIONED)) ids.add(Number(match[1]));
  if (!ids.size) return NO_IMAGES;
  const rows = await showableImages(db, projectId, [...ids]);
  return new Map(rows.map((row) => [String(row.id), markdownImageOf(row)]));
}
