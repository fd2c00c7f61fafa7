/**
 * Photos and files through the real HTTP API, real PostgreSQL and real local storage (a
 * temporary UPLOADS_DIR per app). Served bytes are checked with sharp's own metadata reader, never
 * with the code under test.
 *
 * References, cited beside the checks they cover:
 * - OWASP File Upload Cheat Sheet (cheatsheetseries.owasp.org, File_Upload_Cheat_Sheet.md) — its
 *   principles and the sections "Extension Validation", "Content-Type Validation", "File Signature
 *   Validation", "Filename Sanitization", "File Content Validation", "File Storage Location", "User
 *   Permissions" and "Upload and Download Limits".
 * - OWASP ASVS 5.0, chapter V5 File Handling (github.com/OWASP/ASVS, 5.0/en/0x14-V5-File-Handling.md):
 *   5.2.1 size, 5.2.2 type by content and image re-writing, 5.2.3 archives, 5.2.4 quota, 5.2.5
 *   symlinks, 5.2.6 pixel floods, 5.3.1 not executed, 5.3.2 no user names in paths, 5.3.3 zip
 *   slip, 5.4.1/5.4.2 Content-Disposition; and 3.2.1 (files not rendered in the wrong context).
 */
import fs from 'node:fs';
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import path from 'node:path';
import { and, eq, sql } from 'drizzle-orm';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { uploadRefs, uploads } from '../../db/schema';
import { originalKey } from '../../api/storage/keys';
import { processUploadVariants, reconcileUploads, sweepUploads } from '../../api/uploads/jobs';
import type { Upload } from '../../shared/contracts/uploads';
import { createTestApp, type SignedInAgent, type TestApp } from '../setup/app';
import {
  GPS_EXIF,
  SVG_WITH_SCRIPT,
  jpeg,
  jpegWithGps,
  minimalPdf,
  pngClaiming,
  zipOf,
} from '../fixtures/uploads/files';
import { multipartBody, rawUpload, type Part } from '../fixtures/uploads/multipart';

const MIB = 1024 * 1024;
const IMAGE_LIMIT = Math.floor(1.5 * MIB);
const ATTACHMENT_LIMIT = 2 * MIB;

let t: TestApp;
let maker: SignedInAgent; // owner of the greenhouse vent controller (published) and of a new draft
let editor: SignedInAgent; // editor on the greenhouse vent controller
let member: SignedInAgent; // signed in, edits nothing here
let admin: SignedInAgent;
let server: Server;
let baseUrl: string;
let draft: string;
const PUBLISHED = 'greenhouse-vent-controller';

beforeAll(async () => {
  t = await createTestApp({ env: { UPLOAD_MAX_IMAGE_MB: '1.5', UPLOAD_MAX_ATTACHMENT_MB: '2' } });
  [maker, editor, member, admin] = [
    await t.signIn('ilse-marrow'),
    await t.signIn('juniper-okoye'),
    await t.signIn('bram-tolliver'),
    await t.signIn('quill-haverford'),
  ];
  const created = await maker.agent
    .post('/api/projects')
    .set(maker.headers)
    .send({ title: 'Soil Probe Multiplexer', summary: 'A draft', licence: 'CERN-OHL-S-2.0', hazards: [] })
    .expect(201);
  draft = created.body.slug;
  server = await new Promise<Server>((resolve) => {
    const s = t.app.listen(0, '127.0.0.1', () => resolve(s));
  });
  baseUrl = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
});

afterAll(async () => {
  server?.closeAllConnections();
  await new Promise((resolve) => server?.close(resolve));
  await t?.close();
});

// --- helpers -------------------------------------------------------------------------------------

function send(who: SignedInAgent | null, slug: string, parts: Part[], headers?: Record<string, string>) {
  const { body, contentType } = multipartBody(parts);
  const agent = who ? who.agent : t.agent();
  return agent
    .post(`/api/projects/${slug}/uploads`)
    .set(headers ?? who?.headers ?? { Origin: t.config.appOrigin })
    .set('Content-Type', contentType)
    .send(body);
}

const file = (filename: string, data: Buffer, type = 'application/octet-stream'): Part => ({
  name: 'file',
  filename,
  data,
  type,
});

async function uploadOne(
  who: SignedInAgent,
  slug: string,
  name: string,
  data: Buffer,
  fields: Record<string, string> = {},
): Promise<Upload> {
  const res = await send(who, slug, [
    ...Object.entries(fields).map(([k, v]) => ({ name: k, value: v })),
    file(name, data),
  ]);
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  expect(res.body.items).toHaveLength(1);
  return res.body.items[0] as Upload;
}

/** Upload a photo and run its variants job. */
async function readyPhoto(
  who: SignedInAgent,
  slug: string,
  name = 'board.jpg',
  data?: Buffer,
  fields: Record<string, string> = {},
) {
  const upload = await uploadOne(
    who,
    slug,
    name,
    data ?? (await jpeg(1600, 1200, Math.floor(Math.random() * 1e6))),
    fields,
  );
  expect(await processUploadVariants(t.ctx, upload.id)).toBe('ready');
  return (await maker.agent.get(`/api/uploads/${upload.id}`).expect(200)).body as Upload;
}

function walk(dir: string): string[] {
  if (!fs.existsSync(dir)) return [];
  return fs.readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
    const full = path.join(dir, e.name);
    return e.isDirectory() ? walk(full) : [full];
  });
}

/** Every stored file (relative to UPLOADS_DIR) outside the in-progress folder. */
const storedFiles = () =>
  walk(t.config.uploadsDir)
    .map((f) => path.relative(t.config.uploadsDir, f))
    .filter((f) => !f.startsWith('.incoming'))
    .sort();
const incomingFiles = () => walk(path.join(t.config.uploadsDir, '.incoming'));
const incomingEntries = () =>
  fs.existsSync(path.join(t.config.uploadsDir, '.incoming'))
    ? fs.readdirSync(path.join(t.config.uploadsDir, '.incoming'))
    : [];
const rowCount = async () =>
  Number((await t.ctx.db.execute<{ n: string }>(sql`SELECT count(*) AS n FROM uploads`)).rows[0]!.n);

function fetchFile(who: SignedInAgent | null, url: string) {
  return (who ? who.agent : t.agent())
    .get(url)
    .buffer(true)
    .parse((res, callback) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => callback(null, Buffer.concat(chunks)));
    });
}

async function eventually(check: () => boolean | Promise<boolean>, what: string, ms = 5_000) {
  const until = Date.now() + ms;
  while (Date.now() < until) {
    if (await check()) return;
    await new Promise((r) => setTimeout(r, 50));
  }
  throw new Error(`timed out waiting for ${what}`);
}

async function section(slug: string, who: SignedInAgent = maker) {
  const page = await who.agent.get(`/api/projects/${slug}`).expect(200);
  return page.body.sections[0] as { id: number; revision: number; title: string; html: string };
}

async function writeSection(slug: string, body: string, who: SignedInAgent = maker) {
  const doc = await section(slug, who);
  const res = await who.agent
    .put(`/api/projects/${slug}/documents/${doc.id}`)
    .set(who.headers)
    .send({ baseRevision: doc.revision, title: doc.title, body, message: 'photos' });
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return res.body.document as { id: number; html: string };
}

const imgTags = (html: string) => [...html.matchAll(/<img\b[^>]*>/g)].map((m) => m[0]);

// --- taking files in ----------------------------------------------------------------------------

describe('uploading a photo', () => {
  it('answers 201 at once with the upload processing, then the job makes its variants', async () => {
    const res = await send(maker, draft, [
      { name: 'altText', value: 'The relay board, top side' },
      file('IMG_0042.JPG', await jpeg(1600, 1200), 'image/jpeg'),
    ]);
    expect(res.status).toBe(201);
    const [upload] = res.body.items as Upload[];
    expect(upload).toMatchObject({
      kind: 'image',
      state: 'processing',
      mime: 'image/jpeg',
      name: 'IMG_0042.JPG',
      width: 1600,
      height: 1200,
      altText: 'The relay board, top side',
      variants: [],
      referenced: false,
    });
    expect(upload!.markdownUrl).toBe(`/api/uploads/${upload!.id}/page.webp`);
    expect(await processUploadVariants(t.ctx, upload!.id)).toBe('ready');
    const ready = (await maker.agent.get(`/api/uploads/${upload!.id}`).expect(200)).body as Upload;
    expect(ready.state).toBe('ready');
    expect(ready.variants.map((v) => `${v.name}.${v.format}`).sort()).toEqual([
      'full.jpeg',
      'full.webp',
      'page.jpeg',
      'page.webp',
      'thumb.jpeg',
      'thumb.webp',
    ]);
    expect(ready.srcset).toBe(
      [
        `/api/uploads/${upload!.id}/thumb.webp 400w`,
        `/api/uploads/${upload!.id}/page.webp 1400w`,
        `/api/uploads/${upload!.id}/full.webp 1600w`,
      ].join(', '),
    );
    // A second run of the same job changes nothing (idempotent).
    expect(await processUploadVariants(t.ctx, upload!.id)).toBe('not-processing');
  });

  it('serves the original and every variant without EXIF or GPS, upright (ASVS 5.2.2 image re-writing)', async () => {
    const input = await jpegWithGps(1200, 900);
    // The fixture carries GPS and camera tags (sharp reads them back) and orientation 6.
    const inputMeta = await sharp(input).metadata();
    expect(inputMeta.exif?.includes(Buffer.from(GPS_EXIF.IFD0.Make))).toBe(true);
    expect(inputMeta.orientation).toBe(6);
    const upload = await readyPhoto(maker, draft, 'field photo.jpg', input);
    expect([upload.width, upload.height]).toEqual([900, 1200]);
    for (const url of [upload.url, ...upload.variants.map((v) => v.url)]) {
      const res = await fetchFile(maker, url).expect(200);
      const body = res.body as Buffer;
      const meta = await sharp(body).metadata();
      expect(meta.exif, url).toBeUndefined();
      expect(meta.xmp, url).toBeUndefined();
      expect(meta.orientation, url).toBeUndefined();
      expect(body.includes(Buffer.from(GPS_EXIF.IFD0.Make)), url).toBe(false);
      expect(meta.height! > meta.width!, `${url} is upright`).toBe(true);
      const variant = upload.variants.find((v) => v.url === url);
      if (variant) expect([meta.width, meta.height]).toEqual([variant.width, variant.height]);
    }
  });

  it('removes a script appended after the JPEG data from everything it serves (Cheat Sheet: File Content Validation)', async () => {
    const payload = Buffer.from('<script>fetch("/api/me")</script>');
    const upload = await readyPhoto(maker, draft, 'polyglot.jpg', Buffer.concat([await jpeg(900, 600), payload]));
    for (const url of [upload.url, ...upload.variants.map((v) => v.url)]) {
      const body = (await fetchFile(maker, url).expect(200)).body as Buffer;
      expect(body.includes(Buffer.from('<script')), url).toBe(false);
    }
  });

  it('refuses a PNG whose header claims 30000 × 30000 with 413, quickly, storing nothing (ASVS 5.2.6)', async () => {
    const [before, rows] = [storedFiles(), await rowCount()];
    const started = Date.now();
    const res = await send(maker, draft, [file('flood.png', pngClaiming(30_000, 30_000), 'image/png')]);
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('payload_too_large');
    expect(res.body.error.message).toMatch(/30000 × 30000/);
    expect(Date.now() - started).toBeLessThan(2_000);
    expect(storedFiles()).toEqual(before);
    expect(await rowCount()).toBe(rows);
  });

  it('refuses truncated photos with 400 and stores nothing', async () => {
    const [before, rows] = [storedFiles(), await rowCount()];
    const whole = await jpeg(1200, 900);
    const res = await send(maker, draft, [
      file('cut.jpg', whole.subarray(0, Math.floor(whole.length / 2)), 'image/jpeg'),
    ]);
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/damaged or incomplete/);
    expect(storedFiles()).toEqual(before);
    expect(await rowCount()).toBe(rows);
  });
});

describe('types are decided by content (Cheat Sheet: Content-Type and File Signature Validation; ASVS 5.2.2)', () => {
  it('refuses a text file named .jpg and sent as image/jpeg: a name never makes an image', async () => {
    const res = await send(maker, draft, [file('photo.jpg', Buffer.from('just some words\n'), 'image/jpeg')]);
    expect(res.status).toBe(415);
    expect(res.body.error.code).toBe('unsupported_media_type');
  });

  it('refuses SVG, whatever it is called (it can carry script)', async () => {
    for (const name of ['drawing.svg', 'drawing.txt', 'drawing.png']) {
      const res = await send(maker, draft, [file(name, SVG_WITH_SCRIPT, 'image/svg+xml')]);
      expect(res.status, name).toBe(415);
    }
  });

  it('takes a JPEG sent as text/plain under a .txt name as a photo named .jpg', async () => {
    const upload = await uploadOne(maker, draft, 'scope capture.txt', await jpeg(300, 200));
    expect(upload).toMatchObject({ kind: 'image', mime: 'image/jpeg', name: 'scope capture.txt.jpg' });
  });

  it('takes text, CSV and PDF as attachments, served as downloads of the sniffed type (ASVS 5.4.1, 3.2.1)', async () => {
    const text = await uploadOne(maker, draft, 'serial log.txt', Buffer.from('boot: ok\nrelay: on\n'));
    const csv = await uploadOne(maker, draft, 'bom.csv', Buffer.from('ref,part\nU1,ATmega328P\n'));
    const pdf = await uploadOne(maker, draft, 'schematic Rev B.pdf', minimalPdf());
    expect([text.state, csv.state, pdf.state]).toEqual(['ready', 'ready', 'ready']);
    for (const [upload, type] of [
      [text, 'text/plain; charset=utf-8'],
      [csv, 'text/csv; charset=utf-8'],
      [pdf, 'application/pdf'],
    ] as const) {
      const res = await fetchFile(maker, upload.url).expect(200);
      expect(res.headers['content-type']).toBe(type);
      expect(res.headers['x-content-type-options']).toBe('nosniff');
      expect(res.headers['content-disposition']).toBe(
        `attachment; filename="${upload.name}"; filename*=UTF-8''${encodeURIComponent(upload.name)}`,
      );
      expect(res.headers['content-security-policy']).toMatch(/default-src 'none'/);
      expect(Number(res.headers['content-length'])).toBe(upload.bytes);
    }
    expect(((await fetchFile(maker, pdf.url)).body as Buffer).equals(minimalPdf())).toBe(true);
  });
});

describe('limits (ASVS 5.2.1; Cheat Sheet: Upload and Download Limits)', () => {
  /** A JPEG padded after its end to exactly `bytes` (decoders ignore what follows the image). */
  async function jpegOfSize(bytes: number) {
    const image = await jpeg(800, 600);
    return Buffer.concat([image, Buffer.alloc(bytes - image.length)]);
  }

  it('takes a photo of exactly the limit and refuses one byte more with 413, leaving nothing behind', async () => {
    expect((await uploadOne(maker, draft, 'exact.jpg', await jpegOfSize(IMAGE_LIMIT))).bytes).toBeLessThan(IMAGE_LIMIT);
    const [before, rows] = [storedFiles(), await rowCount()];
    const res = await send(maker, draft, [file('over.jpg', await jpegOfSize(IMAGE_LIMIT + 1), 'image/jpeg')]);
    expect(res.status).toBe(413);
    expect(res.body.error.message).toMatch(/Photos may be at most 1\.5 MB/);
    expect(storedFiles()).toEqual(before);
    expect(await rowCount()).toBe(rows);
    await eventually(() => incomingEntries().length === 0, 'the request folder to go');
  });

  it('refuses an attachment one byte over the largest limit while reading it (multer), leaving nothing behind', async () => {
    const [before, rows] = [storedFiles(), await rowCount()];
    const res = await send(maker, draft, [file('dump.txt', Buffer.alloc(ATTACHMENT_LIMIT + 1, 0x61), 'text/plain')]);
    expect(res.status).toBe(413);
    expect(storedFiles()).toEqual(before);
    expect(await rowCount()).toBe(rows);
    await eventually(() => incomingEntries().length === 0, 'the request folder to go');
  });

  it('refuses 11 files (413), 6 fields (413) and a field that is not altText or caption (400)', async () => {
    const small = await jpeg(40, 30);
    const eleven = Array.from({ length: 11 }, (_, i) => file(`p${i}.jpg`, small, 'image/jpeg'));
    expect((await send(maker, draft, eleven)).status).toBe(413);
    const fields = Array.from({ length: 6 }, (_, i) => ({ name: `f${i}`, value: 'x' }));
    expect((await send(maker, draft, [...fields, file('p.jpg', small)])).status).toBe(413);
    const res = await send(maker, draft, [{ name: 'owner', value: 'someone-else' }, file('p.jpg', small)]);
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation_failed');
    expect((await send(maker, draft, [{ name: 'photo', filename: 'p.jpg', data: small }])).status).toBe(400);
    expect((await send(maker, draft, [{ name: 'altText', value: 'no file' }])).status).toBe(400);
  });

  it('refuses a body that is not multipart with 415', async () => {
    const res = await maker.agent.post(`/api/projects/${draft}/uploads`).set(maker.headers).send({ file: 'x' });
    expect(res.status).toBe(415);
  });
});

describe('who may upload (Cheat Sheet: "Only allow authorized users", "Protect the file upload from CSRF")', () => {
  it('answers an anonymous 50 MB upload with 401 before reading its body, and stores none of it', async () => {
    const result = await rawUpload({
      url: `${baseUrl}/api/projects/${draft}/uploads`,
      headers: { Origin: t.config.appOrigin },
      fileBytes: 50 * MIB,
    });
    expect(result.status).toBe(401);
    expect(JSON.parse(result.body).error.code).toBe('unauthenticated');
    expect(result.headers.connection).toBe('close');
    // The answer came while most of the body was still unsent.
    expect(result.bytesSent).toBeLessThan(result.totalBytes / 2);
    expect(incomingFiles()).toEqual([]);
  });

  it('refuses an upload without the CSRF token (403) before reading it', async () => {
    const [before, rows] = [storedFiles(), await rowCount()];
    const result = await rawUpload({
      url: `${baseUrl}/api/projects/${draft}/uploads`,
      headers: { Origin: t.config.appOrigin, Cookie: maker.cookie },
      fileBytes: 20 * MIB,
    });
    expect(result.status).toBe(403);
    expect(JSON.parse(result.body).error.code).toBe('csrf_failed');
    expect(result.bytesSent).toBeLessThan(result.totalBytes / 2);
    expect(storedFiles()).toEqual(before);
    expect(await rowCount()).toBe(rows);
    const foreign = await send(maker, draft, [file('a.jpg', await jpeg(40, 30))], {
      Origin: 'https://elsewhere.invalid',
      'X-CSRF-Token': maker.csrf,
    });
    expect(foreign.status).toBe(403);
  });

  it('refuses members who do not edit the project: 403 on a published project, 404 on a draft', async () => {
    expect((await send(member, PUBLISHED, [file('a.jpg', await jpeg(40, 30))])).status).toBe(403);
    expect((await send(member, draft, [file('a.jpg', await jpeg(40, 30))])).status).toBe(404);
  });

  it('leaves no temporary file when the client goes away mid-upload', async () => {
    const rows = await rowCount();
    const result = await rawUpload({
      url: `${baseUrl}/api/projects/${draft}/uploads`,
      headers: { Origin: t.config.appOrigin, Cookie: maker.cookie, 'X-CSRF-Token': maker.csrf },
      fileBytes: Math.floor(1.9 * MIB),
      abortAfterBytes: MIB,
      // Wait until the server is writing the file, so the abort lands mid-file.
      beforeAbort: () =>
        eventually(
          () => incomingFiles().some((f) => fs.statSync(f, { throwIfNoEntry: false })?.size),
          'the upload to reach the disk',
        ),
    });
    expect(result.status).toBeNull();
    await eventually(() => incomingEntries().length === 0, 'the request folder to be removed');
    expect(await rowCount()).toBe(rows);
  });
});

describe('hostile file names (Cheat Sheet: Filename Sanitization; ASVS 5.3.2, 5.4.2)', () => {
  // PDF content (whatever the name says, the type is the content's), each a little different.
  const cases: [string, string][] = [
    ['../../etc/passwd', 'passwd.pdf'],
    ['..\\..\\boot.ini', 'boot.ini.pdf'],
    ['readme\u202Efdp.exe', 'readmefdp.exe.pdf'],
    ['line\r\nbreak.pdf', 'line break.pdf'],
    [`${'n'.repeat(300)}.pdf`, `${'n'.repeat(116)}.pdf`],
  ];
  async function expectStoredByContent(upload: Upload, content: Buffer) {
    const [row] = await t.ctx.db.select().from(uploads).where(eq(uploads.id, upload.id));
    expect(row!.storageKey).toMatch(/^originals\/[0-9a-f]{64}$/);
    expect(fs.readFileSync(path.join(t.config.uploadsDir, row!.storageKey)).equals(content)).toBe(true);
    // Nothing was written anywhere a name could have pointed.
    expect(
      storedFiles().every((f) => /^(originals\/[0-9a-f]{64}|variants\/[0-9a-f]{64}\/[a-z]+\.[a-z]+)$/.test(f)),
    ).toBe(true);
    const res = await fetchFile(maker, upload.url).expect(200);
    expect(res.headers['content-disposition']).not.toMatch(/[\r\n\u0000\u202E]/);
  }
  for (const [raw, expected] of cases) {
    it(`stores ${JSON.stringify(raw.slice(0, 40))} as ${JSON.stringify(expected.slice(0, 40))}, under its content key`, async () => {
      const content = minimalPdf(raw);
      const upload = await uploadOne(maker, draft, raw, content);
      expect(upload.name).toBe(expected);
      await expectStoredByContent(upload, content);
    });
  }

  it('removes a NUL sent in an RFC 8187 file name, and refuses a raw NUL in a part header (400)', async () => {
    const content = minimalPdf('nul');
    const { body, contentType } = multipartBody([
      { name: 'file', filename: 'ignored.pdf', filenameStar: "utf-8''notes%00.php.pdf", data: content },
    ]);
    const res = await maker.agent
      .post(`/api/projects/${draft}/uploads`)
      .set(maker.headers)
      .set('Content-Type', contentType)
      .send(body);
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.items[0].name).toBe('notes.php.pdf');
    await expectStoredByContent(res.body.items[0], content);
    const rows = await rowCount();
    expect((await send(maker, draft, [file('notes\u0000.php', minimalPdf('raw nul'))])).status).toBe(400);
    expect(await rowCount()).toBe(rows);
  });
});

describe('ZIP attachments (ASVS 5.2.3, 5.2.5, 5.3.3)', () => {
  it('lists the entries of a ZIP without unpacking it, and serves it as a download', async () => {
    const upload = await uploadOne(
      maker,
      draft,
      'fab files.zip',
      zipOf([{ name: 'gerbers/top.gbr' }, { name: 'drill.drl', data: Buffer.alloc(300, 1) }]),
    );
    expect(upload.entries).toEqual([
      { name: 'gerbers/top.gbr', bytes: 'contents of gerbers/top.gbr\n'.length, compressedBytes: expect.any(Number) },
      { name: 'drill.drl', bytes: 300, compressedBytes: expect.any(Number) },
    ]);
    expect(upload.entriesTruncated).toBe(false);
    const res = await fetchFile(maker, upload.url).expect(200);
    expect(res.headers['content-type']).toBe('application/zip');
    expect(res.headers['content-disposition']).toMatch(/^attachment; filename="fab files.zip"/);
  });

  it('lists 2,000 of a ZIP’s 10,000 entries and says the list is cut', async () => {
    const upload = await uploadOne(
      maker,
      draft,
      'many.zip',
      zipOf(Array.from({ length: 10_000 }, (_, i) => ({ name: `n${i}`, data: Buffer.from('1') }))),
    );
    expect(upload.entries).toHaveLength(2_000);
    expect(upload.entriesTruncated).toBe(true);
  });

  it('refuses a ZIP declaring a 10 GB entry, one with "../" paths and one with a symlink (415)', async () => {
    const rows = await rowCount();
    for (const [name, bytes] of [
      ['bomb.zip', zipOf([{ name: 'image.bin', declaredBytes: 10 * 1024 ** 3 }])],
      ['slip.zip', zipOf([{ name: '../../.ssh/authorized_keys' }])],
      ['link.zip', zipOf([{ name: 'passwd', data: Buffer.from('/etc/passwd'), symlink: true }])],
    ] as const) {
      const res = await send(maker, draft, [file(name, bytes, 'application/zip')]);
      expect(res.status, name).toBe(415);
    }
    expect(await rowCount()).toBe(rows);
  });
});

describe('the variants job with workers running', () => {
  let w: TestApp;
  afterAll(async () => {
    await w?.close();
  });

  it('makes the variants in the background; they are served with the sizes the upload lists', async () => {
    w = await createTestApp({ workers: true });
    const owner = await w.signIn('ilse-marrow');
    const { body, contentType } = multipartBody([file('bench.jpg', await jpeg(3200, 2400, 99), 'image/jpeg')]);
    const created = await owner.agent
      .post(`/api/projects/${PUBLISHED}/uploads`)
      .set(owner.headers)
      .set('Content-Type', contentType)
      .send(body)
      .expect(201);
    const id = created.body.items[0].id as number;
    let upload: Upload | undefined;
    await eventually(
      async () => {
        upload = (await owner.agent.get(`/api/uploads/${id}`).expect(200)).body as Upload;
        return upload.state !== 'processing';
      },
      'the variants job',
      20_000,
    );
    expect(upload!.state).toBe('ready');
    const widths = Object.fromEntries(
      upload!.variants.filter((v) => v.format === 'webp').map((v) => [v.name, v.width]),
    );
    expect(widths).toEqual({ thumb: 400, page: 1400, full: 2800 });
    for (const variant of upload!.variants) {
      const res = await owner.agent
        .get(variant.url)
        .buffer(true)
        .parse((r, callback) => {
          const chunks: Buffer[] = [];
          r.on('data', (c: Buffer) => chunks.push(c));
          r.on('end', () => callback(null, Buffer.concat(chunks)));
        })
        .expect(200);
      const meta = await sharp(res.body as Buffer).metadata();
      expect([meta.format, meta.width, meta.height], variant.url).toEqual([
        variant.format,
        variant.width,
        variant.height,
      ]);
      expect(Number(res.headers['content-length'])).toBe(variant.bytes);
    }
  });
});

describe('identical files are stored once', () => {
  it('keeps one file for two uploads of the same photo; the second is ready at once; deleting one keeps the other’s file', async () => {
    const bytes = await jpeg(700, 500, 4242);
    const first = await readyPhoto(maker, draft, 'same.jpg', bytes);
    const second = await uploadOne(maker, draft, 'same again.jpg', bytes);
    expect(second.id).not.toBe(first.id);
    expect(second.state).toBe('ready');
    expect(second.variants.map((v) => v.bytes)).toEqual(first.variants.map((v) => v.bytes));
    const rows = await t.ctx.db
      .select()
      .from(uploads)
      .where(sql`${uploads.id} IN (${first.id}, ${second.id})`);
    expect(new Set(rows.map((r) => r.storageKey)).size).toBe(1);
    const key = rows[0]!.storageKey;
    expect(storedFiles().filter((f) => f === key)).toHaveLength(1);

    await maker.agent.delete(`/api/uploads/${second.id}`).set(maker.headers).expect(204);
    expect(fs.existsSync(path.join(t.config.uploadsDir, key))).toBe(true);
    await fetchFile(maker, first.variants[0]!.url).expect(200);
    await maker.agent.delete(`/api/uploads/${first.id}`).set(maker.headers).expect(204);
    expect(fs.existsSync(path.join(t.config.uploadsDir, key))).toBe(false);
    expect(storedFiles().some((f) => f.startsWith(`variants/${key.slice('originals/'.length)}`))).toBe(false);
  });
});

// --- serving and access -----------------------------------------------------------------------------

describe('access to a draft’s photos (Cheat Sheet: User Permissions)', () => {
  let photo: Upload;
  beforeAll(async () => {
    photo = await readyPhoto(maker, draft, 'private.jpg');
  });

  it('hides them from anonymous readers and other members (404), everywhere', async () => {
    for (const who of [null, member]) {
      expect((await (who ? who.agent : t.agent()).get(`/api/uploads/${photo.id}`)).status).toBe(404);
      expect((await fetchFile(who, photo.url)).status).toBe(404);
      expect((await fetchFile(who, photo.variants[0]!.url)).status).toBe(404);
      expect((await (who ? who.agent : t.agent()).get(`/api/projects/${draft}/uploads`)).status).toBe(404);
    }
  });

  it('serves them to the owner and to admins, privately cached, inline with a CSP that allows nothing', async () => {
    for (const who of [maker, admin]) {
      const res = await fetchFile(
        who,
        photo.variants.find((v) => v.name === 'page' && v.format === 'webp')!.url,
      ).expect(200);
      expect(res.headers['content-type']).toBe('image/webp');
      expect(res.headers['cache-control']).toMatch(/^private, max-age=\d+$/);
      expect(res.headers['content-disposition']).toMatch(/^inline; /);
      expect(res.headers['content-security-policy']).toBe("default-src 'none'; sandbox");
      expect(res.headers['x-content-type-options']).toBe('nosniff');
      expect(res.headers.etag).toMatch(/^"[0-9a-f]{64}\.page\.webp"$/);
    }
  });

  it('answers 304 to a matching If-None-Match after checking access again', async () => {
    const first = await fetchFile(maker, photo.url).expect(200);
    await maker.agent
      .get(photo.url)
      .set('If-None-Match', first.headers.etag as string)
      .expect(304);
    expect(
      (
        await t
          .agent()
          .get(photo.url)
          .set('If-None-Match', first.headers.etag as string)
      ).status,
    ).toBe(404);
  });

  it('answers 404 for files an upload does not have', async () => {
    for (const name of ['original.png', 'huge.webp', 'page.gif', 'original.jpg.php', '..%2F..%2Fpasswd']) {
      expect((await maker.agent.get(`/api/uploads/${photo.id}/${name}`)).status, name).toBe(404);
    }
  });
});

describe('access to a published project’s photos', () => {
  it('serves ready photos to everyone, publicly cacheable; editors alone see processing ones in the gallery', async () => {
    const ready = await readyPhoto(editor, PUBLISHED, 'enclosure.jpg');
    const processing = await uploadOne(editor, PUBLISHED, 'wip.jpg', await jpeg(600, 400));
    const res = await fetchFile(null, ready.variants[0]!.url).expect(200);
    expect(res.headers['cache-control']).toBe('public, max-age=3600');
    const anonymous = (await t.agent().get(`/api/projects/${PUBLISHED}/uploads`).expect(200)).body;
    expect(anonymous.items.map((u: Upload) => u.id)).toContain(ready.id);
    expect(anonymous.items.map((u: Upload) => u.id)).not.toContain(processing.id);
    const forEditor = (await editor.agent.get(`/api/projects/${PUBLISHED}/uploads`).expect(200)).body;
    expect(forEditor.items.map((u: Upload) => u.id)).toEqual(expect.arrayContaining([ready.id, processing.id]));
    expect(forEditor.quota.usedBytes).toBeGreaterThan(0);
    expect(forEditor.quota.limitBytes).toBe(1000 * MIB);
  });

  it('lets only editors change or remove an upload', async () => {
    const upload = await uploadOne(maker, PUBLISHED, 'notes.txt', Buffer.from('bench notes\n'));
    expect(
      (await member.agent.patch(`/api/uploads/${upload.id}`).set(member.headers).send({ caption: 'x' })).status,
    ).toBe(403);
    expect(
      (await t.agent().patch(`/api/uploads/${upload.id}`).set('Origin', t.config.appOrigin).send({ caption: 'x' }))
        .status,
    ).toBe(401);
    expect((await member.agent.delete(`/api/uploads/${upload.id}`).set(member.headers)).status).toBe(403);
    const changed = await editor.agent
      .patch(`/api/uploads/${upload.id}`)
      .set(editor.headers)
      .send({ caption: 'Bench notes, week 3' })
      .expect(200);
    expect(changed.body.caption).toBe('Bench notes, week 3');
    expect(
      (await editor.agent.patch(`/api/uploads/${upload.id}`).set(editor.headers).send({ altText: 'x' })).status,
    ).toBe(400);
  });
});

// --- Markdown, references and cleanup ------------------------------------------------------------

describe('photos in the write-up', () => {
  it('renders an uploaded photo with srcset, size and lazy loading, and refreshes when its variants and alt text change', async () => {
    const upload = await uploadOne(maker, draft, 'in text.jpg', await jpeg(1600, 1200, 77));
    expect(upload.state).toBe('processing');
    const doc = await writeSection(draft, `Before\n\n![](${upload.markdownUrl} "Rev B, top")\n`);
    // Still processing: the stripped original, no srcset.
    let [img] = imgTags((await section(draft)).html);
    expect(img).toContain(`src="/api/uploads/${upload.id}/original.jpg"`);
    expect(img).not.toContain('srcset');

    await processUploadVariants(t.ctx, upload.id);
    [img] = imgTags((await section(draft)).html);
    expect(img).toContain(`src="/api/uploads/${upload.id}/page.webp"`);
    expect(img).toContain(
      `srcset="/api/uploads/${upload.id}/thumb.webp 400w, /api/uploads/${upload.id}/page.webp 1400w, /api/uploads/${upload.id}/full.webp 1600w"`,
    );
    expect(img).toContain('width="1400"');
    expect(img).toContain('height="1050"');
    expect(img).toContain('loading="lazy"');
    expect(img).toContain('title="Rev B, top"');
    expect(img).toContain('alt=""');

    await maker.agent
      .patch(`/api/uploads/${upload.id}`)
      .set(maker.headers)
      .send({ altText: 'Relay board, top side' })
      .expect(200);
    [img] = imgTags((await section(draft)).html);
    expect(img).toContain('alt="Relay board, top side"');
    // The section's own page shows the same.
    const single = await maker.agent.get(`/api/projects/${draft}/documents/${doc.id}`).expect(200);
    expect(imgTags(single.body.html)[0]).toContain('alt="Relay board, top side"');
  });

  it('does not show another project’s photo (rendered as its alt text)', async () => {
    const foreign = await readyPhoto(editor, PUBLISHED, 'not yours.jpg');
    await writeSection(draft, `![borrowed photo](${foreign.markdownUrl})\n`);
    const { html } = await section(draft);
    expect(imgTags(html)).toEqual([]);
    expect(html).toContain('borrowed photo');
    expect(await t.ctx.db.select().from(uploadRefs).where(eq(uploadRefs.uploadId, foreign.id))).toEqual([]);
  });

  it('renders photos in errata fields, lessons, comments and board revision notes too', async () => {
    const photo = await readyPhoto(maker, draft, 'everywhere.jpg');
    const md = `![](${photo.markdownUrl})`;
    const board = await maker.agent
      .post(`/api/projects/${draft}/board-revisions`)
      .set(maker.headers)
      .send({ label: 'Rev A', notes: md })
      .expect(201);
    expect(imgTags(board.body.notesHtml)[0]).toContain('srcset=');
    const erratum = await maker.agent
      .post(`/api/projects/${draft}/errata`)
      .set(maker.headers)
      .send({
        title: 'Relay chatters',
        category: 'power',
        severity: 'major',
        status: 'open',
        affected: [board.body.id],
        symptom: md,
      })
      .expect(201);
    expect(imgTags(erratum.body.html.symptom)[0]).toContain('srcset=');
    const lesson = await maker.agent
      .post(`/api/projects/${draft}/lessons`)
      .set(maker.headers)
      .send({ body: md, tags: [], errata: [] })
      .expect(201);
    expect(imgTags(lesson.body.html)[0]).toContain('srcset=');
    const comment = await maker.agent
      .post(`/api/projects/${draft}/errata/${erratum.body.number}/comments`)
      .set(maker.headers)
      .send({ body: md });
    expect(comment.status, JSON.stringify(comment.body)).toBe(201);
    expect(imgTags(comment.body.html)[0]).toContain('srcset=');
    const refs = await t.ctx.db.select().from(uploadRefs).where(eq(uploadRefs.uploadId, photo.id));
    expect(refs.map((r) => r.subject).sort()).toEqual(['board_revision', 'comment', 'erratum', 'lesson']);
  });
});

describe('references and the sweep', () => {
  const later = (hours: number) => new Date(Date.now() + hours * 3_600_000);

  it('marks uploads unreferenced until content uses them, and again when it stops', async () => {
    const upload = await uploadOne(maker, draft, 'ref.txt', Buffer.from('referenced?\n'));
    const marker = async () =>
      (await t.ctx.db.select().from(uploads).where(eq(uploads.id, upload.id)))[0]!.unreferencedSince;
    expect(await marker()).not.toBeNull();
    await writeSection(draft, `See [the notes](${upload.url}).\n`);
    expect(await marker()).toBeNull();
    expect((await maker.agent.get(`/api/uploads/${upload.id}`)).body.referenced).toBe(true);
    expect((await maker.agent.delete(`/api/uploads/${upload.id}`).set(maker.headers)).status).toBe(409);
    await writeSection(draft, 'No more links.\n');
    expect(await marker()).not.toBeNull();
    await maker.agent.delete(`/api/uploads/${upload.id}`).set(maker.headers).expect(204);
  });

  it('removes an upload unreferenced past the grace period with its files, and keeps a referenced one', async () => {
    const kept = await readyPhoto(maker, draft, 'kept.jpg');
    const dropped = await readyPhoto(maker, draft, 'dropped.jpg');
    await writeSection(draft, `![kept](${kept.markdownUrl})\n`);
    const keyOf = async (id: number) =>
      (await t.ctx.db.select().from(uploads).where(eq(uploads.id, id)))[0]?.storageKey;
    const droppedKey = (await keyOf(dropped.id))!;
    const droppedSha = droppedKey.slice('originals/'.length);
    expect(storedFiles().filter((f) => f.includes(droppedSha))).toHaveLength(7);

    // Within the grace period nothing goes.
    await sweepUploads(t.ctx, later(1));
    expect(await keyOf(dropped.id)).toBe(droppedKey);

    const report = await sweepUploads(t.ctx, later(25));
    expect(report.removed).toBeGreaterThanOrEqual(1);
    expect(await keyOf(dropped.id)).toBeUndefined();
    expect(storedFiles().filter((f) => f.includes(droppedSha))).toEqual([]);
    expect(await keyOf(kept.id)).toBeDefined();
    await fetchFile(maker, kept.variants[0]!.url).expect(200);
  });

  it('keeps a photo a pending proposal shows, until the proposal is decided', async () => {
    const photo = await readyPhoto(editor, PUBLISHED, 'proposed.jpg');
    const doc = await section(PUBLISHED);
    const proposal = await member.agent
      .post(`/api/projects/${PUBLISHED}/proposals`)
      .set(member.headers)
      .send({
        kind: 'document_edit',
        documentId: doc.id,
        baseRevision: doc.revision,
        message: 'add the photo',
        payload: { title: doc.title, body: `![](${photo.markdownUrl})\n`, loggedOn: null },
      });
    expect(proposal.status, JSON.stringify(proposal.body)).toBe(201);
    const refs = await t.ctx.db
      .select()
      .from(uploadRefs)
      .where(and(eq(uploadRefs.uploadId, photo.id), eq(uploadRefs.subject, 'proposal')));
    expect(refs).toHaveLength(1);
    await sweepUploads(t.ctx, later(48));
    expect(await t.ctx.db.select().from(uploads).where(eq(uploads.id, photo.id))).toHaveLength(1);
    await editor.agent
      .post(`/api/proposals/${proposal.body.id}/decline`)
      .set(editor.headers)
      .send({ reason: 'not now' })
      .expect(200);
    expect(await t.ctx.db.select().from(uploadRefs).where(eq(uploadRefs.uploadId, photo.id))).toEqual([]);
  });
});

describe('the startup reconcile', () => {
  it('fails referenced rows whose file is gone, removes unreferenced ones, old orphan files and stale temporary files, and re-queues processing photos', async () => {
    const referenced = await uploadOne(maker, draft, 'gone but used.txt', Buffer.from('used\n'));
    await writeSection(draft, `[gone](${referenced.url})\n`);
    const unreferenced = await uploadOne(maker, draft, 'gone.txt', Buffer.from('unused\n'));
    const processing = await uploadOne(maker, draft, 'waiting.jpg', await jpeg(500, 400));
    for (const id of [referenced.id, unreferenced.id]) {
      const [row] = await t.ctx.db.select().from(uploads).where(eq(uploads.id, id));
      fs.rmSync(path.join(t.config.uploadsDir, row!.storageKey));
    }
    // A crash between writing a file and committing its row leaves a file no row names…
    const orphanKey = originalKey('c'.repeat(64));
    await t.ctx.storage.put(orphanKey, Buffer.from('orphan'), 'text/plain');
    // …and a crash mid-write leaves a temporary file; a crash mid-request a request folder.
    const temp = path.join(t.config.uploadsDir, 'originals', '.tmp-crashed');
    fs.writeFileSync(temp, 'half');
    fs.mkdirSync(path.join(t.config.uploadsDir, '.incoming', 'req-crashed'), { recursive: true });
    // The job of the processing photo was lost.
    await t.ctx.db.execute(sql`DELETE FROM pgboss.job WHERE name = 'upload-variants'`);

    // Run as if two hours later, so the files count as old.
    const report = await reconcileUploads(t.ctx, new Date(Date.now() + 2 * 3_600_000));
    expect(report).toMatchObject({ missingFailed: 1, missingRemoved: 1 });
    expect(report.orphanFiles).toBeGreaterThanOrEqual(1);
    expect(report.temporaryFiles).toBe(2);
    const failed = (await maker.agent.get(`/api/uploads/${referenced.id}`).expect(200)).body as Upload;
    expect(failed.state).toBe('failed');
    expect(failed.failure).toMatch(/missing/);
    expect((await maker.agent.get(`/api/uploads/${unreferenced.id}`)).status).toBe(404);
    expect(await t.ctx.storage.exists(orphanKey)).toBe(false);
    expect(fs.existsSync(temp)).toBe(false);
    expect(incomingEntries()).not.toContain('req-crashed');
    const jobs = await t.ctx.db.execute<{ n: string }>(
      sql`SELECT count(*) AS n FROM pgboss.job WHERE name = 'upload-variants' AND singleton_key = ${`upload-${processing.id}`}`,
    );
    expect(Number(jobs.rows[0]!.n)).toBe(1);
  });

  it('spares a file written within the last hour (its row may be about to commit)', async () => {
    const fresh = originalKey('d'.repeat(64));
    await t.ctx.storage.put(fresh, Buffer.from('just written'), 'text/plain');
    await reconcileUploads(t.ctx);
    expect(await t.ctx.storage.exists(fresh)).toBe(true);
  });
});

// --- cover photo and publishing ----------------------------------------------------------------------

describe('the cover photo', () => {
  it('sets a ready photo of the project as cover, shown on the project page and on its card, and keeps it in use', async () => {
    const photo = await readyPhoto(maker, draft, 'cover.jpg', undefined, { altText: 'The finished probe in a pot' });
    const res = await maker.agent
      .put(`/api/projects/${draft}/cover`)
      .set(maker.headers)
      .send({ uploadId: photo.id })
      .expect(200);
    const page = photo.variants.find((v) => v.name === 'page' && v.format === 'webp')!;
    expect(res.body.cover).toEqual({
      url: page.url,
      srcset: photo.srcset,
      sizes: photo.sizes,
      width: page.width,
      height: page.height,
      altText: 'The finished probe in a pot',
    });
    expect((await maker.agent.get(`/api/projects/${draft}`).expect(200)).body.cover.url).toBe(page.url);
    const mine = await maker.agent.get('/api/me/projects').expect(200);
    expect(mine.body.items.find((p: { slug: string }) => p.slug === draft).cover.url).toBe(page.url);
    expect((await maker.agent.delete(`/api/uploads/${photo.id}`).set(maker.headers)).status).toBe(409);
    await maker.agent.put(`/api/projects/${draft}/cover`).set(maker.headers).send({ uploadId: null }).expect(200);
    expect((await maker.agent.get(`/api/projects/${draft}`).expect(200)).body.cover).toBeNull();
  });

  it('refuses another project’s photo, an attachment and a photo still processing', async () => {
    const foreign = await readyPhoto(editor, PUBLISHED, 'theirs.jpg');
    const text = await uploadOne(maker, draft, 'a.txt', Buffer.from('a\n'));
    const processing = await uploadOne(maker, draft, 'slow.jpg', await jpeg(300, 200));
    for (const id of [foreign.id, text.id, processing.id]) {
      expect(
        (await maker.agent.put(`/api/projects/${draft}/cover`).set(maker.headers).send({ uploadId: id })).status,
      ).toBe(400);
    }
    expect(
      (await member.agent.put(`/api/projects/${PUBLISHED}/cover`).set(member.headers).send({ uploadId: foreign.id }))
        .status,
    ).toBe(403);
  });

  it('shows the cover on published projects’ cards for everyone', async () => {
    const photo = await readyPhoto(maker, PUBLISHED, 'greenhouse.jpg', undefined, {
      altText: 'Vent controller on the greenhouse wall',
    });
    await maker.agent
      .put(`/api/projects/${PUBLISHED}/cover`)
      .set(maker.headers)
      .send({ uploadId: photo.id })
      .expect(200);
    const list = await t.agent().get('/api/projects').expect(200);
    expect(list.body.items.find((p: { slug: string }) => p.slug === PUBLISHED).cover.altText).toBe(
      'Vent controller on the greenhouse wall',
    );
    await maker.agent.put(`/api/projects/${PUBLISHED}/cover`).set(maker.headers).send({ uploadId: null }).expect(200);
  });
});

describe('publishing needs alt text', () => {
  it('refuses to publish while a photo in the content has no alt text, and publishes once it has', async () => {
    const created = await maker.agent
      .post('/api/projects')
      .set(maker.headers)
      .send({ title: 'Alt Text Check Board', summary: '', licence: 'MIT', hazards: [] })
      .expect(201);
    const slug = created.body.slug as string;
    const unlabelled = await readyPhoto(maker, slug, 'IMG_1001.jpg');
    const labelledInMarkdown = await readyPhoto(maker, slug, 'IMG_1002.jpg');
    await writeSection(
      slug,
      `![](${unlabelled.markdownUrl})\n\n![Probe tip close-up](${labelledInMarkdown.markdownUrl})\n`,
    );

    const refused = await maker.agent.post(`/api/projects/${slug}/publish`).set(maker.headers);
    expect(refused.status).toBe(400);
    expect(refused.body.error.code).toBe('validation_failed');
    expect(refused.body.error.details).toEqual({
      images: [
        {
          uploadId: unlabelled.id,
          name: 'IMG_1001.jpg',
          thumbUrl: `/api/uploads/${unlabelled.id}/thumb.webp`,
          usedIn: 'Section “Overview”',
        },
      ],
    });
    expect((await maker.agent.get(`/api/projects/${slug}`).expect(200)).body.status).toBe('draft');

    await maker.agent
      .patch(`/api/uploads/${unlabelled.id}`)
      .set(maker.headers)
      .send({ altText: 'Probe on the bench, wired to the multiplexer' })
      .expect(200);
    const published = await maker.agent.post(`/api/projects/${slug}/publish`).set(maker.headers).expect(200);
    expect(published.body.status).toBe('published');
  });

  it('counts the cover photo, which needs the upload’s own alt text', async () => {
    const created = await maker.agent
      .post('/api/projects')
      .set(maker.headers)
      .send({ title: 'Cover Alt Board', summary: '', licence: 'MIT', hazards: [] })
      .expect(201);
    const slug = created.body.slug as string;
    const photo = await readyPhoto(maker, slug, 'cover.jpg');
    await maker.agent.put(`/api/projects/${slug}/cover`).set(maker.headers).send({ uploadId: photo.id }).expect(200);
    const refused = await maker.agent.post(`/api/projects/${slug}/publish`).set(maker.headers).expect(400);
    expect(refused.body.error.details.images).toEqual([
      expect.objectContaining({ uploadId: photo.id, usedIn: 'Cover photo' }),
    ]);
  });
});

describe('the quota (ASVS 5.2.4)', () => {
  let q: TestApp;
  afterAll(async () => {
    await q?.close();
  });

  it('refuses with 413 and a clear message an upload that would pass the member’s quota, storing nothing', async () => {
    q = await createTestApp({ env: { UPLOAD_QUOTA_MB: '0.5' } });
    const owner = await q.signIn('ilse-marrow');
    const first = multipartBody([file('a.txt', Buffer.alloc(300 * 1024, 0x61))]);
    await owner.agent
      .post(`/api/projects/${PUBLISHED}/uploads`)
      .set(owner.headers)
      .set('Content-Type', first.contentType)
      .send(first.body)
      .expect(201);
    const before = walk(path.join(q.config.uploadsDir, 'originals'));
    const second = multipartBody([file('b.txt', Buffer.alloc(300 * 1024, 0x62))]);
    const res = await owner.agent
      .post(`/api/projects/${PUBLISHED}/uploads`)
      .set(owner.headers)
      .set('Content-Type', second.contentType)
      .send(second.body);
    expect(res.status).toBe(413);
    expect(res.body.error.message).toMatch(/Your uploads use 0\.3 MB of your 0\.5 MB/);
    expect(res.body.error.details).toMatchObject({ usedBytes: 300 * 1024, limitBytes: Math.floor(0.5 * MIB) });
    expect(walk(path.join(q.config.uploadsDir, 'originals'))).toEqual(before);
  });
});

describe('the route table', () => {
  it('documents the upload route as multipart in the OpenAPI document', async () => {
    const doc = (await t.agent().get('/api/openapi.json').expect(200)).body;
    expect(Object.keys(doc.paths['/api/projects/{slug}/uploads'].post.requestBody.content)).toEqual([
      'multipart/form-data',
    ]);
  });
});
