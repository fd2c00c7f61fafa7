/**
 * The photo pipeline on real images built with sharp. What comes out is checked by reading it
 * back with sharp's own metadata, never with the pipeline's code.
 *
 * OWASP File Upload Cheat Sheet, "File Content Validation" (image rewriting destroys content
 * injected into an image); OWASP ASVS 5.0 requirements 5.2.2 (image re-writing), 5.2.6 (images
 * above the pixel limit refused: pixel floods) and 5.2.1 (only what we can process without harm).
 */
import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { variantWidths } from '../../../shared/contracts/uploads';
import { AppError } from '../../../api/http/errors';
import { inspectImage, normalizeImage, renderVariants, type ImagePolicy } from '../../../api/uploads/pipeline';
import { animatedGif, jpeg, jpegWithGps, png, pngClaiming } from '../../fixtures/uploads/files';

const policy: ImagePolicy = { maxPixels: 40_000_000, maxFrames: 300 };

async function refusal(work: Promise<unknown>): Promise<AppError> {
  const error = await work.then(
    () => null,
    (e: unknown) => e,
  );
  expect(error).toBeInstanceOf(AppError);
  return error as AppError;
}

describe('normalizing a photo', () => {
  it('drops EXIF (camera and GPS), XMP and ICC data, and turns the photo upright', async () => {
    const input = await jpegWithGps(800, 600);
    const before = await sharp(input).metadata();
    // The fixture really carries what must go: tags, and orientation 6 (shown rotated 90°).
    expect(before.exif?.length).toBeGreaterThan(100);
    expect(before.orientation).toBe(6);

    const image = await normalizeImage(input, await inspectImage(input, 'jpeg', policy), policy);
    const after = await sharp(image.data).metadata();
    expect(after.format).toBe('jpeg');
    expect(after.exif).toBeUndefined();
    expect(after.xmp).toBeUndefined();
    expect(after.iptc).toBeUndefined();
    expect(after.icc).toBeUndefined();
    expect(after.orientation).toBeUndefined();
    // Upright: 800 × 600 stored with orientation 6 is a 600 × 800 picture.
    expect([after.width, after.height]).toEqual([600, 800]);
    expect([image.width, image.height]).toEqual([600, 800]);
  });

  it('re-encodes a JPEG with a script appended after its end: none of the payload survives', async () => {
    const payload = '<script>fetch("/api/me").then(r=>r.text()).then(alert)</script>';
    const polyglot = Buffer.concat([await jpeg(320, 240), Buffer.from(payload)]);
    const image = await normalizeImage(polyglot, await inspectImage(polyglot, 'jpeg', policy), policy);
    expect(image.data.includes(Buffer.from('<script'))).toBe(false);
    expect(image.data.includes(Buffer.from('alert'))).toBe(false);
    expect((await sharp(image.data).metadata()).width).toBe(320);
  });

  it('refuses a PNG whose header claims 30000 × 30000 in milliseconds, without decoding it', async () => {
    const flood = pngClaiming(30_000, 30_000);
    expect(flood.length).toBeLessThan(200);
    const started = performance.now();
    const error = await refusal(inspectImage(flood, 'png', policy));
    expect(performance.now() - started).toBeLessThan(500);
    expect(error.status).toBe(413);
    expect(error.message).toMatch(/30000 × 30000/);
  });

  it('refuses truncated photos with 400, in every format it decodes', async () => {
    for (const [format, bytes] of [
      ['jpeg', await jpeg(640, 480)],
      ['png', await png(640, 480)],
      ['webp', await sharp(await png(640, 480)).webp().toBuffer()],
    ] as const) {
      const truncated = bytes.subarray(0, Math.floor(bytes.length * 0.6));
      const error = await refusal(
        inspectImage(truncated, format, policy).then((inspected) => normalizeImage(truncated, inspected, policy)),
      );
      expect(error.status, format).toBe(400);
    }
  });

  it('refuses content that does not match the type its magic bytes gave', async () => {
    expect((await refusal(inspectImage(await png(20, 20), 'jpeg', policy))).status).toBe(400);
  });

  it('keeps an animation animated, and refuses one with more frames than the cap', async () => {
    const gif = await animatedGif(4, 48, 32);
    const inspected = await inspectImage(gif, 'gif', policy);
    expect(inspected.frames).toBe(4);
    const image = await normalizeImage(gif, inspected, policy);
    expect((await sharp(image.data).metadata()).pages).toBe(4);
    const error = await refusal(inspectImage(gif, 'gif', { ...policy, maxFrames: 3 }));
    expect(error.status).toBe(413);
  });
});

describe('variants', () => {
  it('makes thumb, page and full in WebP and in the original format, never wider than the original', async () => {
    const input = await jpeg(3000, 2000);
    const image = await normalizeImage(input, await inspectImage(input, 'jpeg', policy), policy);
    const variants = await renderVariants(image.data, 'jpeg', 1, image.width, policy);
    expect(variants.map((v) => `${v.name}.${v.ext}`).sort()).toEqual(
      ['full.jpg', 'full.webp', 'page.jpg', 'page.webp', 'thumb.jpg', 'thumb.webp'].sort(),
    );
    for (const variant of variants) {
      const meta = await sharp(variant.data).metadata();
      expect(meta.format).toBe(variant.format);
      expect(meta.width).toBe(Math.min(variantWidths[variant.name], 3000));
      // Aspect ratio 3:2 kept (to the pixel).
      expect(Math.abs(meta.height - (meta.width * 2) / 3)).toBeLessThanOrEqual(1);
      expect([variant.width, variant.height]).toEqual([meta.width, meta.height]);
      expect(meta.exif).toBeUndefined();
    }
  });

  it('does not enlarge a small photo and makes only WebP for a WebP original', async () => {
    const input = await sharp(await png(300, 200)).webp().toBuffer();
    const image = await normalizeImage(input, await inspectImage(input, 'webp', policy), policy);
    const variants = await renderVariants(image.data, 'webp', 1, image.width, policy);
    expect(variants).toHaveLength(3);
    for (const variant of variants) expect((await sharp(variant.data).metadata()).width).toBe(300);
  });

  it('keeps the frames of an animated GIF in both formats', async () => {
    const gif = await animatedGif(3, 600, 400);
    const inspected = await inspectImage(gif, 'gif', policy);
    const image = await normalizeImage(gif, inspected, policy);
    const variants = await renderVariants(image.data, 'gif', image.frames, image.width, policy);
    const thumb = variants.find((v) => v.name === 'thumb' && v.format === 'webp')!;
    const meta = await sharp(thumb.data).metadata();
    expect(meta.pages).toBe(3);
    expect(meta.width).toBe(400);
  });
});
