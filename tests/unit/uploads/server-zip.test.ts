/**
 * ZIP attachments are listed from their central directory, never unpacked, and refused when
 * they would hurt whoever unpacks them. The ZIPs are assembled byte by byte after PKWARE's
 * APPNOTE.TXT (tests/fixtures/uploads/files.ts), so the hostile fields are exactly what is claimed.
 *
 * OWASP File Upload Cheat Sheet, "Upload and Download Limits" (the size after decompression
 * counts); OWASP ASVS 5.0 requirements 5.2.3 (uncompressed size and number of files checked before
 * unpacking), 5.2.5 (no symlinks) and 5.3.3 (user-provided paths in archives are not followed).
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { AppError } from '../../../api/http/errors';
import { MAX_DECLARED_BYTES, MAX_LISTED, listZip } from '../../../api/uploads/zip';
import { zipOf, type ZipEntrySpec } from '../../fixtures/uploads/files';

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'rwb-zip-'));
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));
let n = 0;

function write(entries: ZipEntrySpec[] | Buffer): string {
  const file = path.join(dir, `z${n++}.zip`);
  fs.writeFileSync(file, Buffer.isBuffer(entries) ? entries : zipOf(entries));
  return file;
}

async function refusal(file: string): Promise<AppError> {
  const error = await listZip(file).then(
    () => null,
    (e: unknown) => e,
  );
  expect(error).toBeInstanceOf(AppError);
  return error as AppError;
}

describe('ZIP listing', () => {
  it('lists names and sizes of a fabrication ZIP', async () => {
    const listing = await listZip(
      write([
        { name: 'gerbers/board-F_Cu.gbr', data: Buffer.alloc(5000, 0x47) },
        { name: 'gerbers/board-B_Cu.gbr', data: Buffer.from('G04 bottom*\n') },
        { name: 'drill/board.drl' },
      ]),
    );
    expect(listing.entries.map((e) => e.name)).toEqual(['gerbers/board-F_Cu.gbr', 'gerbers/board-B_Cu.gbr', 'drill/board.drl']);
    expect(listing.entries[0]).toMatchObject({ bytes: 5000 });
    expect(listing.entries[0]!.compressedBytes).toBeLessThan(100);
    expect(listing.entriesTruncated).toBe(false);
    expect(listing.declaredBytes).toBe(5000 + 12 + 'contents of drill/board.drl\n'.length);
  });

  it('lists the first 2,000 of 10,000 entries and says the list is cut', async () => {
    const listing = await listZip(write(Array.from({ length: 10_000 }, (_, i) => ({ name: `parts/p${i}.txt`, data: Buffer.from('x') }))));
    expect(MAX_LISTED).toBe(2_000);
    expect(listing.entries).toHaveLength(2_000);
    expect(listing.entries.at(-1)!.name).toBe('parts/p1999.txt');
    expect(listing.entriesTruncated).toBe(true);
    expect(listing.entryCount).toBe(10_000);
  });

  it('refuses an entry that declares 10 GB (a ZIP bomb), without unpacking anything', async () => {
    const file = write([{ name: 'firmware.bin', declaredBytes: 10 * 1024 ** 3 }]);
    expect(fs.statSync(file).size).toBeLessThan(1_000);
    const error = await refusal(file);
    expect(error.status).toBe(415);
    expect((error.details as { declaredBytes: number }).declaredBytes).toBe(10 * 1024 ** 3);
  });

  it('refuses many entries that add up to more than the declared limit', async () => {
    const each = 1024 ** 3 - 1;
    expect(3 * each).toBeGreaterThan(MAX_DECLARED_BYTES);
    expect((await refusal(write([1, 2, 3].map((i) => ({ name: `part${i}.bin`, declaredBytes: each }))))).status).toBe(415);
  });

  it('refuses entries that would unpack outside their folder (zip slip)', async () => {
    expect((await refusal(write([{ name: '../../home/maker/.bashrc' }]))).message).toMatch(/outside/);
    expect((await refusal(write([{ name: '/etc/cron.d/job' }]))).status).toBe(415);
  });

  it('refuses symbolic links', async () => {
    expect((await refusal(write([{ name: 'datasheet.pdf', data: Buffer.from('/etc/passwd'), symlink: true }]))).message).toMatch(/symbolic/);
  });

  it('answers 400 for a file that only starts like a ZIP', async () => {
    const broken = zipOf([{ name: 'a.txt' }]).subarray(0, 40);
    expect((await refusal(write(broken))).status).toBe(400);
  });
});
