/**
 * Contracts of uploads: photos (with variants for thumbnails, page width and full view) and
 * attachments (PDF, ZIP, plain text, CSV). Files are served by `/api/uploads/:id/:file` with the
 * access rules of the project they belong to.
 */
import { z } from 'zod';
import { hiddenInfoSchema } from './moderation';
import { line } from '../text';

export const imageTypes = ['image/jpeg', 'image/png', 'image/webp', 'image/avif', 'image/gif'] as const;
export const attachmentTypes = ['application/pdf', 'application/zip', 'text/plain', 'text/csv'] as const;

/** Variant names: a thumbnail, the page-width image, the full view, and the kept original. */
export const variantNames = ['thumb', 'page', 'full'] as const;
export type VariantName = (typeof variantNames)[number];
/** Target widths in CSS pixels × 2 for sharp screens (a variant is never wider than the original). */
export const variantWidths: Record<VariantName, number> = { thumb: 400, page: 1400, full: 2800 };

export const variantSchema = z.object({
  name: z.enum(variantNames),
  /** 'webp' or the original's own format, re-encoded (jpeg, png, avif, gif). */
  format: z.string(),
  width: z.number().int(),
  height: z.number().int(),
  bytes: z.number().int(),
  /** App-relative URL of the file. */
  url: z.string(),
});
export type Variant = z.infer<typeof variantSchema>;

export const zipEntrySchema = z.object({ name: z.string(), bytes: z.number().int(), compressedBytes: z.number().int() });

export const uploadSchema = z
  .object({
    id: z.number().int(),
    kind: z.enum(['image', 'attachment']),
    state: z.enum(['processing', 'ready', 'failed']),
    mime: z.string(),
    bytes: z.number().int(),
    /** A safe display name made by the server from the client's file name. */
    name: z.string(),
    width: z.number().int().nullable(),
    height: z.number().int().nullable(),
    altText: z.string(),
    caption: z.string(),
    variants: z.array(variantSchema),
    /** URL of the stored original (images: re-encoded without metadata; attachments: the file). */
    url: z.string(),
    /** What to put in Markdown to show the image at page width (or link the attachment). */
    markdownUrl: z.string(),
    /** For images: `srcset` and `sizes` ready for an `<img>`. */
    srcset: z.string().nullable(),
    sizes: z.string().nullable(),
    /** ZIP attachments: the entries (not extracted), possibly cut at a limit. */
    entries: z.array(zipEntrySchema).nullable(),
    entriesTruncated: z.boolean(),
    failure: z.string().nullable(),
    referenced: z.boolean(),
    createdAt: z.string(),
    /** Set when moderators hid it; only the project's members, its uploader and moderators see it. */
    hidden: hiddenInfoSchema.nullable().optional(),
  })
  .meta({ id: 'Upload' });
export type Upload = z.infer<typeof uploadSchema>;

export const uploadListSchema = z
  .object({ items: z.array(uploadSchema), quota: z.object({ usedBytes: z.number().int(), limitBytes: z.number().int() }) })
  .meta({ id: 'UploadList' });
export type UploadList = z.infer<typeof uploadListSchema>;

export const uploadParamsSchema = z.strictObject({ uploadId: z.coerce.number().int().min(1) });

export const updateUploadSchema = z
  .strictObject({
    altText: line({ min: 0, max: 300, label: 'Alt text' }).optional(),
    caption: line({ min: 0, max: 300, label: 'Caption' }).optional(),
  })
  .meta({ id: 'UpdateUpload' });
export type UpdateUpload = z.input<typeof updateUploadSchema>;

export const setCoverSchema = z.strictObject({ uploadId: z.number().int().min(1).nullable() }).meta({ id: 'SetCover' });

/** `details` of the 400 a publish gets when images in the project lack alt text. */
export const missingAltTextSchema = z.object({
  images: z.array(z.object({ uploadId: z.number().int(), name: z.string(), thumbUrl: z.string().nullable(), usedIn: z.string() })),
});
export type MissingAltText = z.infer<typeof missingAltTextSchema>;
