/**
 * The photo pipeline on a 12-megapixel JPEG (4000 × 3000, quality 90, a gradient with noise so it
 * compresses like a photo): what a request does (sniff, header check, decode, rotate, strip,
 * re-encode the original) and what the variants job does (thumb, page, full in WebP and JPEG),
 * timed per image and two at a time, with the peak resident memory, next to one plain sharp call
 * on the same image in the same run: `sharp(input).rotate().resize(1400).webp().toBuffer()`.
 */
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import sharp from 'sharp';
import { inspectImage, normalizeImage, renderVariants, type ImagePolicy } from '../../api/uploads/pipeline';
import { sniffFile } from '../../api/uploads/types';
import { photoPixels } from '../fixtures/uploads/files';
import { fmt, percentile } from './harness';

const policy: ImagePolicy = { maxPixels: 40_000_000, maxFrames: 300 };
const RUNS = 8;
const WARMUP = 2;

/** Peak RSS while `work` runs, sampled every 5 ms (and at the end), with the RSS before it. */
async function withPeakRss<T>(
  work: () => Promise<T>,
): Promise<{ result: T; ms: number; peakMb: number; startMb: number }> {
  const startRss = process.memoryUsage.rss();
  let peak = startRss;
  const timer = setInterval(() => {
    peak = Math.max(peak, process.memoryUsage.rss());
  }, 5);
  const started = process.hrtime.bigint();
  try {
    const result = await work();
    const ms = Number(process.hrtime.bigint() - started) / 1e6;
    peak = Math.max(peak, process.memoryUsage.rss());
    return { result, ms, peakMb: peak / 2 ** 20, startMb: startRss / 2 ** 20 };
  } finally {
    clearInterval(timer);
  }
}

async function sharpAlone(input: string) {
  return sharp(input).rotate().resize(1400).webp().toBuffer();
}

/** Everything the product does to one photo, request and job. */
async function pipeline(input: string, size: number) {
  const kind = await sniffFile(input, 'IMG_4000.JPG', size);
  const inspected = await inspectImage(input, kind.format!, policy);
  const original = await normalizeImage(input, inspected, policy);
  createHash('sha256').update(original.data).digest('hex');
  const variants = await renderVariants(original.data, original.format, original.frames, original.width, policy);
  return { original, variants };
}

async function requestPart(input: string, size: number) {
  const kind = await sniffFile(input, 'IMG_4000.JPG', size);
  const inspected = await inspectImage(input, kind.format!, policy);
  return normalizeImage(input, inspected, policy);
}

interface Series {
  label: string;
  ms: number[];
  peakOverStartMb: number;
  peakMb: number;
}

async function series(label: string, work: () => Promise<unknown>): Promise<Series> {
  for (let i = 0; i < WARMUP; i++) await work();
  const ms: number[] = [];
  let peakOverStartMb = 0;
  let peakMb = 0;
  for (let i = 0; i < RUNS; i++) {
    global.gc?.();
    const run = await withPeakRss(work);
    ms.push(run.ms);
    peakOverStartMb = Math.max(peakOverStartMb, run.peakMb - run.startMb);
    peakMb = Math.max(peakMb, run.peakMb);
  }
  return { label, ms, peakOverStartMb, peakMb };
}

/** Images per second with two at a time, over `images` images. */
async function throughput(
  images: number,
  work: () => Promise<unknown>,
): Promise<{ perSecond: number; peakMb: number }> {
  await Promise.all([work(), work()]);
  let done = 0;
  const run = await withPeakRss(async () => {
    const lane = async () => {
      while (done < images) {
        done++;
        await work();
      }
    };
    await Promise.all([lane(), lane()]);
  });
  return { perSecond: images / (run.ms / 1000), peakMb: run.peakMb };
}

export async function run(): Promise<string[]> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'rwb-bench-uploads-'));
  try {
    const width = 4000;
    const height = 3000;
    const input = path.join(dir, 'IMG_4000.JPG');
    await sharp(photoPixels(width, height, 12), { raw: { width, height, channels: 3 } })
      .jpeg({ quality: 90 })
      .toFile(input);
    const size = fs.statSync(input).size;
    const check = await pipeline(input, size);

    const alone = await series('sharp alone: rotate, resize to 1400 px, WebP', () => sharpAlone(input));
    const request = await series(
      'request part: sniff, header check, decode, rotate, strip, re-encode the original (JPEG q90)',
      () => requestPart(input, size),
    );
    const job = await series('variants job: thumb, page, full in WebP and JPEG from the stored original', () =>
      renderVariants(check.original.data, 'jpeg', 1, check.original.width, policy),
    );
    const whole = await series('whole pipeline (request part + variants job)', () => pipeline(input, size));
    const base = percentile(alone.ms, 50);
    const aloneTwo = await throughput(8, () => sharpAlone(input));
    const wholeTwo = await throughput(8, () => pipeline(input, size));

    const row = (s: Series) =>
      `| ${s.label} | ${RUNS} | ${fmt(percentile(s.ms, 50), 0)} | ${fmt(percentile(s.ms, 95), 0)} | ${fmt(percentile(s.ms, 50) / base, 1)} | ${fmt(s.peakOverStartMb, 0)} | ${fmt(s.peakMb, 0)} |`;
    return [
      `Input: ${width} × ${height} JPEG, quality 90, ${(size / 2 ** 20).toFixed(1)} MB; stored original ${(check.original.data.length / 2 ** 20).toFixed(1)} MB; ` +
        `variants ${check.variants.map((v) => `${v.name}.${v.ext} ${v.width} px ${(v.data.length / 1024).toFixed(0)} kB`).join(', ')}. ` +
        `sharp ${sharp.versions.sharp}, libvips ${sharp.versions.vips}, concurrency ${sharp.concurrency()}, operation cache off.`,
      '',
      `One image at a time (${RUNS} runs after ${WARMUP} warm-up; RSS sampled every 5 ms):`,
      '',
      '| work | runs | p50 ms | p95 ms | ratio to sharp alone | peak RSS above start MB | peak RSS MB |',
      '|---|---|---|---|---|---|---|',
      row(alone),
      row(request),
      row(job),
      row(whole),
      '',
      'Two images at a time (8 images, two lanes):',
      '',
      '| work | images/s | ratio to sharp alone | peak RSS MB |',
      '|---|---|---|---|',
      `| sharp alone | ${fmt(aloneTwo.perSecond)} | 1.00 | ${fmt(aloneTwo.peakMb, 0)} |`,
      `| whole pipeline | ${fmt(wholeTwo.perSecond)} | ${fmt(wholeTwo.perSecond / aloneTwo.perSecond)} | ${fmt(wholeTwo.peakMb, 0)} |`,
      '',
      `Process maximum RSS over the benchmark (getrusage): ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MB.`,
    ];
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}
