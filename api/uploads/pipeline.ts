/**
 * The photo pipeline, with sharp (libvips). Pure functions of bytes: no database, no storage, so
 * the benchmark and the unit tests run exactly what a request and the variants job run.
 *
 * 1. `inspectImage` reads the header only (no pixels decoded): the format must be the one the
 *    magic bytes said, and the size within the product's limits — a PNG that claims 30000 × 30000
 *    is refused in a millisecond, before any memory is spent on it.
 * 2. `normalizeImage` decodes it (refusing truncated or corrupt data: `failOn: 'error'`), turns it
 *    upright (`rotate()` applies the EXIF orientation), converts it to sRGB and re-encodes it in
 *    its own format with every piece of metadata dropped — EXIF (camera, time, GPS), XMP, IPTC,
 *    comments and the ICC profile (the pixels are converted to sRGB, the web's default, instead).
 *    Re-encoding also drops whatever was appended after the image data or hidden in chunks the
 *    decoder skips (polyglot files).
 * 3. `renderVariants` makes the thumbnail, page and full sizes in WebP and in the original format.
 *
 * OWASP File Upload Cheat Sheet, "File Content Validation" (image rewriting destroys content
 * injected into an image); OWASP ASVS 5.0 requirements 5.2.2 (content validated, image
 * re-writing), 5.2.6 (images above the pixel limit refused: pixel floods) and 5.2.1 (only what we
 * can process without harm).
 */
import sharp, { type Metadata, type Sharp } from 'sharp';
import { variantNames, variantWidths, type VariantName } from '../../shared/contracts/uploads';
import { AppError } from '../http/errors';
import type { SharpFormat } from './types';

// Every upload is new to libvips: its operation cache would only hold memory, never hit.
sharp.cache(false);

export interface ImagePolicy {
  /** Largest width × height of one frame. */
  maxPixels: number;
  /** Most frames of an animation. */
  maxFrames: number;
}

export const MAX_FRAMES = 300;
/** All frames of an animation together may hold this many frames' worth of the pixel limit. */
export const ANIMATION_PIXEL_FACTOR = 2;

export interface InspectedImage {
  format: SharpFormat;
  /** Of one frame, as stored (before orientation). */
  width: number;
  height: number;
  frames: number;
}

export interface NormalizedImage {
  data: Buffer;
  format: SharpFormat;
  /** Upright, of one frame. */
  width: number;
  height: number;
  frames: number;
}

export interface RenderedVariant {
  name: VariantName;
  format: SharpFormat;
  ext: string;
  width: number;
  height: number;
  data: Buffer;
}

export const formatExtension: Record<SharpFormat, string> = { jpeg: 'jpg', png: 'png', webp: 'webp', avif: 'avif', gif: 'gif' };

const damaged = (reason?: string) =>
  new AppError('bad_request', 'This photo could not be read: the file is damaged or incomplete.', reason ? { reason } : undefined);

function formatOf(metadata: Metadata): SharpFormat | null {
  switch (metadata.format) {
    case 'jpeg':
    case 'png':
    case 'webp':
    case 'gif':
      return metadata.format;
    case 'heif':
      return metadata.compression === 'av1' ? 'avif' : null;
    default:
      return null;
  }
}

const reasonOf = (error: unknown) => (error instanceof Error ? error.message.split('\n')[0]!.slice(0, 200) : String(error));

export async function inspectImage(input: Buffer | string, expected: SharpFormat, policy: ImagePolicy): Promise<InspectedImage> {
  let metadata: Metadata;
  try {
    // Header only; the pixel limit is checked below with a message that says what it is.
    metadata = await sharp(input, { limitInputPixels: false, failOn: 'error' }).metadata();
  } catch (error) {
    throw damaged(reasonOf(error));
  }
  const format = formatOf(metadata);
  if (format !== expected) throw damaged(`the content is ${metadata.format ?? 'unknown'}, its header says ${expected}`);
  const frames = Math.max(1, metadata.pages ?? 1);
  const width = metadata.width;
  const height = frames > 1 ? (metadata.pageHeight ?? metadata.height) : metadata.height;
  if (!width || !height) throw damaged('no size in the header');
  const megapixels = (n: number) => `${(n / 1e6).toLocaleString('en', { maximumFractionDigits: 1 })} megapixels`;
  if (width * height > policy.maxPixels) {
    throw new AppError(
      'payload_too_large',
      `This photo is ${width} × ${height} pixels (${megapixels(width * height)}); the limit is ${megapixels(policy.maxPixels)}. Scale it down and upload it again.`,
      { width, height, limitPixels: policy.maxPixels },
    );
  }
  if (frames > policy.maxFrames || frames * width * height > policy.maxPixels * ANIMATION_PIXEL_FACTOR) {
    throw new AppError(
      'payload_too_large',
      `This animation has ${frames} frames of ${width} × ${height} pixels; animations may have at most ${policy.maxFrames} frames and ${megapixels(policy.maxPixels * ANIMATION_PIXEL_FACTOR)} in all.`,
      { frames, limitFrames: policy.maxFrames },
    );
  }
  return { format, width, height, frames };
}

function decoder(input: Buffer | string, frames: number, policy: ImagePolicy): Sharp {
  return sharp(input, {
    failOn: 'error',
    animated: frames > 1,
    limitInputPixels: policy.maxPixels * (frames > 1 ? ANIMATION_PIXEL_FACTOR : 1),
  });
}

function encode(image: Sharp, format: SharpFormat, purpose: 'original' | 'variant'): Sharp {
  const original = purpose === 'original';
  switch (format) {
    case 'jpeg':
      return image.jpeg({ quality: original ? 90 : 82, progressive: !original });
    case 'png':
      return image.png({ compressionLevel: original ? 6 : 7 });
    case 'webp':
      // Effort 2 for variants: a third faster than the default 4 at 2800 px, files no larger (docs/benchmarks.md).
      return image.webp({ quality: original ? 90 : 80, effort: original ? 4 : 2 });
    case 'avif':
      return image.avif({ quality: original ? 70 : 55, effort: original ? 4 : 2 });
    case 'gif':
      return image.gif();
  }
}

/** Decode, orient, strip, re-encode in the same format. No `keep*`/`with*Metadata` call: nothing is kept. */
export async function normalizeImage(input: Buffer | string, inspected: InspectedImage, policy: ImagePolicy): Promise<NormalizedImage> {
  try {
    const { data, info } = await encode(decoder(input, inspected.frames, policy).rotate(), inspected.format, 'original').toBuffer({
      resolveWithObject: true,
    });
    const frames = info.pages ?? 1;
    return { data, format: inspected.format, width: info.width, height: frames > 1 ? (info.pageHeight ?? info.height) : info.height, frames };
  } catch (error) {
    throw damaged(reasonOf(error));
  }
}

/**
 * The variants of a normalized original: each name in WebP and, unless that is WebP, the
 * original's format. A photo narrower than a size gets its own width there (never enlarged), and
 * sizes that come out equally wide are encoded once.
 */
export async function renderVariants(original: Buffer, format: SharpFormat, frames: number, width: number, policy: ImagePolicy): Promise<RenderedVariant[]> {
  const formats: SharpFormat[] = format === 'webp' ? ['webp'] : ['webp', format];
  const base = decoder(original, frames, policy);
  const encoded = new Map<string, Promise<{ data: Buffer; width: number; height: number }>>();
  const encodeOnce = (target: number, outFormat: SharpFormat) => {
    const key = `${outFormat}:${target}`;
    let job = encoded.get(key);
    if (!job) {
      job = encode(base.clone().resize({ width: target, withoutEnlargement: true }), outFormat, 'variant')
        .toBuffer({ resolveWithObject: true })
        .then(({ data, info }) => {
          const pages = info.pages ?? 1;
          return { data, width: info.width, height: pages > 1 ? (info.pageHeight ?? info.height) : info.height };
        });
      encoded.set(key, job);
    }
    return job;
  };
  const jobs = variantNames.flatMap((name) =>
    formats.map(async (outFormat): Promise<RenderedVariant> => {
      const result = await encodeOnce(Math.min(variantWidths[name], width), outFormat);
      return { name, format: outFormat, ext: formatExtension[outFormat], ...result };
    }),
  );
  return Promise.all(jobs);
}
