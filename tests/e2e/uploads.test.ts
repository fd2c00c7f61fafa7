/**
 * Photos in a write-up, end to end: a maker pastes a camera photo (with GPS tags) into a section,
 * watches it upload, describes it, sees it in the editor, saves, and finds it in the project's
 * gallery; the image the server hands out carries no location. A file picked with the editor's
 * picker becomes a link.
 */
import type { Page } from 'playwright-core';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { expectNoProblems, startProduct, type Product } from '../setup/browser';

let product: Product;
beforeAll(async () => {
  product = await startProduct();
});
afterAll(async () => {
  await product?.close();
});

async function signInAs(page: Page, name: string, returnTo: string) {
  await page.goto(`/api/auth/github?returnTo=${encodeURIComponent(returnTo)}`);
  await page.getByRole('button', { name: new RegExp(`Continue as ${name}`) }).click();
}

/** Where a camera would write it (degrees, minutes, seconds as rationals). */
const GPS = { GPSLatitudeRef: 'N', GPSLatitude: '47/1 22/1 11/1', GPSLongitudeRef: 'E', GPSLongitude: '8/1 32/1 29/1' };

/** A 1600 × 1200 "bench photo": a green board with pads, a chip and a wire, tagged like a phone's. */
async function benchPhoto(): Promise<Buffer> {
  const drawing = `<svg xmlns="http://www.w3.org/2000/svg" width="1600" height="1200">
    <rect width="1600" height="1200" fill="#6b5b45"/>
    <rect x="200" y="180" width="1200" height="840" rx="40" fill="#1f6b3a"/>
    ${Array.from({ length: 12 }, (_, i) => `<circle cx="${320 + i * 90}" cy="260" r="22" fill="#d9b45a"/>`).join('')}
    <rect x="640" y="480" width="320" height="240" fill="#222"/>
    <path d="M 420 860 C 700 600, 1000 1000, 1240 640" stroke="#c33" stroke-width="14" fill="none"/>
  </svg>`;
  return sharp(Buffer.from(drawing))
    .jpeg({ quality: 85 })
    .withExif({ IFD0: { Make: 'Bench Camera Co', Model: 'Model 7' }, IFD3: GPS })
    .toBuffer();
}

/** Whether TIFF-structured EXIF data (as sharp reports it) points to a GPS directory (tag 0x8825). */
function hasGpsDirectory(exif: Buffer | undefined): boolean {
  if (!exif) return false;
  const start = exif.subarray(0, 6).toString('latin1') === 'Exif\0\0' ? 6 : 0;
  const tiff = exif.subarray(start);
  const little = tiff.subarray(0, 2).toString('latin1') === 'II';
  const u16 = (at: number) => (little ? tiff.readUInt16LE(at) : tiff.readUInt16BE(at));
  const u32 = (at: number) => (little ? tiff.readUInt32LE(at) : tiff.readUInt32BE(at));
  const ifd0 = u32(4);
  const count = u16(ifd0);
  for (let i = 0; i < count; i++) if (u16(ifd0 + 2 + i * 12) === 0x8825) return true;
  return false;
}

async function documentBody(page: Page, slug: string, title: string): Promise<string> {
  // A draft: read as the signed-in maker, with the page's cookies.
  const detail = (await (await page.request.get(`/api/projects/${slug}`)).json()) as {
    sections: { id: number; title: string }[];
  };
  const section = detail.sections.find((s) => s.title === title)!;
  const doc = (await (await page.request.get(`/api/projects/${slug}/documents/${section.id}`)).json()) as { body: string };
  return doc.body;
}

describe('photos in a write-up', () => {
  it('pastes a photo into a section, describes it, saves, finds it in the gallery, and serves it without location', async () => {
    const photo = await benchPhoto();
    // The photo really carries a location, so the check at the end means something.
    expect(hasGpsDirectory((await sharp(photo).metadata()).exif)).toBe(true);

    const { page, problems } = await product.newPage();
    await signInAs(page, 'Ilse Marrow', '/new');
    await page.getByLabel('Title').fill('Kiln Relay Board');
    await page.getByLabel('One-line summary').fill('Relay board for a small ceramics kiln.');
    await page.getByRole('button', { name: 'Create draft' }).click();
    await page.getByTestId('project-title').filter({ hasText: 'Kiln Relay Board' }).waitFor();
    const slug = new URL(page.url()).pathname.split('/').pop()!;

    await page.getByRole('link', { name: 'Edit Overview' }).click();
    const editor = page.getByRole('textbox', { name: 'Text of Overview' });
    await editor.click();
    await page.keyboard.type('The relay board after the first bodge.');

    // Hold the upload until the description is in, so its progress can be watched.
    let release!: () => void;
    const held = new Promise<void>((resolve) => (release = resolve));
    await page.route('**/api/projects/*/uploads', async (route) => {
      if (route.request().method() === 'POST') await held;
      await route.continue();
    });

    await editor.evaluate(
      (surface, bytes) => {
        const data = new DataTransfer();
        data.items.add(new File([new Uint8Array(bytes)], 'relay-board.jpg', { type: 'image/jpeg' }));
        surface.dispatchEvent(new ClipboardEvent('paste', { clipboardData: data, bubbles: true, cancelable: true }));
      },
      [...photo],
    );

    // At once: the local preview in the text, and a progress bar beside the editor.
    const placeholder = editor.locator('.rwb-upload-placeholder');
    await expect.poll(() => placeholder.textContent()).toMatch(/Uploading “relay-board\.jpg” — \d+ %/);
    expect(await placeholder.locator('img').getAttribute('src')).toMatch(/^blob:/);
    const progress = page.getByRole('progressbar', { name: 'Uploading relay-board.jpg' });
    await progress.waitFor();
    expect(Number(await progress.getAttribute('aria-valuenow'))).toBeGreaterThanOrEqual(0);

    // The description is asked for while it uploads.
    const dialog = page.getByTestId('alt-text-dialog');
    await dialog.getByText('Describe the photo for readers who cannot see it').waitFor();
    await dialog.getByLabel('Alt text').fill('Relay board with the bodge wire from D7 to the relay input');
    await dialog.getByLabel('Caption (optional)').fill('Rev A, top side');
    await dialog.getByRole('button', { name: 'Save description' }).click();
    await dialog.waitFor({ state: 'detached' });
    release();

    // The uploaded image replaces the preview in the editor, and it has really loaded.
    const image = editor.locator('img[src^="/api/uploads/"]');
    await image.waitFor();
    await expect.poll(() => image.evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth)).toBeGreaterThan(0);
    await placeholder.waitFor({ state: 'detached' });
    await progress.waitFor({ state: 'detached' });
    const src = (await image.getAttribute('src'))!;
    expect(src).toMatch(/^\/api\/uploads\/\d+\/page\.webp$/);

    // A schematic picked with the editor's picker becomes a link at the cursor.
    await editor.getByText('The relay board after the first bodge.').click();
    await page.keyboard.press('End');
    await page.keyboard.type(' Pin list:');
    await page.getByTestId('upload-picker').setInputFiles({
      name: 'relay-pins.csv',
      mimeType: 'text/csv',
      buffer: Buffer.from('pin,signal\nD7,relay\nD2,thermocouple CS\n'),
    });
    await editor.getByRole('link', { name: 'relay-pins.csv' }).waitFor();

    await page.getByTestId('save').click();
    await expect
      .poll(() => documentBody(page, slug, 'Overview'))
      .toContain(`![Relay board with the bodge wire from D7 to the relay input](${src} "Rev A, top side")`);
    const body = await documentBody(page, slug, 'Overview');
    expect(body).toMatch(/Pin list: \[relay-pins\.csv\]\(\/api\/uploads\/\d+\/original\.csv\)/);
    expect(body).not.toContain('blob:');

    // The gallery, reached from the project page.
    await page.getByRole('button', { name: 'Done' }).click();
    await page.getByTestId('gallery-link').click();
    const photos = page.getByTestId('gallery-photos');
    await photos.locator('img[alt="Relay board with the bodge wire from D7 to the relay input"]').waitFor();
    await photos.getByText('Rev A, top side').waitFor();
    await page.getByRole('link', { name: 'relay-pins.csv', exact: true }).waitFor();

    // What the server hands out has no location: neither the page image nor the kept original.
    const uploadId = /^\/api\/uploads\/(\d+)\//.exec(src)![1];
    const upload = (await (await page.request.get(`/api/uploads/${uploadId}`)).json()) as { url: string };
    for (const url of [src, upload.url]) {
      const served = await page.request.get(url);
      expect(served.status()).toBe(200);
      const metadata = await sharp(await served.body()).metadata();
      expect(hasGpsDirectory(metadata.exif), `${url} has GPS tags`).toBe(false);
    }
    expectNoProblems(problems);
  });
});
