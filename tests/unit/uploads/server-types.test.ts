/**
 * What an upload is, decided from its bytes.
 *
 * OWASP File Upload Cheat Sheet, "List Allowed Extensions", "Content-Type Validation" (the
 * client's type can be spoofed and is never read here) and "File Signature Validation"; OWASP ASVS
 * 5.0 requirement 5.2.2 (the extension must be an expected one and the content must be of the type
 * the extension names: magic bytes, specialised libraries).
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { sniffFile } from '../../../api/uploads/types';
import { AppError } from '../../../api/http/errors';
import { SVG_WITH_SCRIPT, animatedGif, jpeg, minimalPdf, png, zipOf } from '../../fixtures/uploads/files';
import sharp from 'sharp';

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'rwb-sniff-'));
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

let n = 0;
function onDisk(bytes: Buffer | string): { file: string; size: number } {
  const file = path.join(dir, `f${n++}`);
  fs.writeFileSync(file, bytes);
  return { file, size: fs.statSync(file).size };
}

async function sniff(bytes: Buffer | string, name: string) {
  const { file, size } = onDisk(bytes);
  return sniffFile(file, name, size);
}

async function refusal(bytes: Buffer | string, name: string): Promise<AppError> {
  const error = await sniff(bytes, name).then(
    () => null,
    (e: unknown) => e,
  );
  expect(error, `${name} should be refused`).toBeInstanceOf(AppError);
  return error as AppError;
}

describe('types from content', () => {
  it('recognises each photo format by its magic bytes, whatever the name says', async () => {
    expect((await sniff(await jpeg(40, 30), 'scan.pdf')).mime).toBe('image/jpeg');
    expect((await sniff(await png(40, 30), 'IMG_2041')).mime).toBe('image/png');
    expect((await sniff(await sharp(await png(40, 30)).webp().toBuffer(), 'x.jpg')).mime).toBe('image/webp');
    expect((await sniff(await sharp(await png(40, 30)).avif().toBuffer(), 'x.png')).mime).toBe('image/avif');
    expect((await sniff(await animatedGif(2, 16, 16), 'x.txt')).mime).toBe('image/gif');
  });

  it('recognises PDF and ZIP attachments by content', async () => {
    expect(await sniff(minimalPdf(), 'schematic')).toMatchObject({ kind: 'attachment', mime: 'application/pdf' });
    expect(await sniff(zipOf([{ name: 'gerbers/top.gbr' }]), 'fab.bin')).toMatchObject({ kind: 'attachment', mime: 'application/zip' });
  });

  it('takes UTF-8 text and CSV only under a text name, as attachments', async () => {
    expect(await sniff('Measured 4.98 V at TP3 with the relay on.\n', 'bench notes.txt')).toMatchObject({ kind: 'attachment', mime: 'text/plain' });
    expect(await sniff('\uFEFFpin,signal\nD7,RELAY\n', 'pins.csv')).toMatchObject({ mime: 'text/csv' });
    expect((await sniff('boot ok\n', 'serial.log')).mime).toBe('text/plain');
  });

  it('never makes a text file named .jpg an image: it is refused (415)', async () => {
    const error = await refusal('this is not a photo\n', 'photo.jpg');
    expect(error.code).toBe('unsupported_media_type');
    expect(error.status).toBe(415);
  });

  it('refuses SVG, by name and when its markup hides behind a .txt name', async () => {
    expect((await refusal(SVG_WITH_SCRIPT, 'drawing.svg')).message).toMatch(/SVG/);
    expect((await refusal(SVG_WITH_SCRIPT, 'drawing.txt')).message).toMatch(/markup/);
    expect((await refusal('<?xml version="1.0"?><svg xmlns="http://www.w3.org/2000/svg"/>', 'drawing.svg')).status).toBe(415);
    expect((await refusal('<!DOCTYPE html><script>alert(1)</script>', 'page.txt')).status).toBe(415);
  });

  it('refuses text that is not UTF-8 or holds NUL bytes', async () => {
    expect((await refusal(Buffer.from([0x68, 0x69, 0xff, 0xfe, 0x0a]), 'latin.txt')).message).toMatch(/UTF-8/);
    expect((await refusal(Buffer.from('a\u0000b\n'), 'nul.txt')).message).toMatch(/NUL/);
    // UTF-16 text is full of NUL bytes: refused rather than guessed at.
    expect((await refusal(Buffer.from('hello', 'utf16le'), 'wide.txt')).status).toBe(415);
  });

  it('refuses other binary types, even those built on ZIP or images, and executables', async () => {
    expect((await refusal(Buffer.from([0x4d, 0x5a, 0x90, 0x00, ...Buffer.alloc(60)]), 'tool.exe')).status).toBe(415);
    expect((await refusal(await sharp(await png(16, 16)).tiff().toBuffer(), 'board.tif')).status).toBe(415);
    expect((await refusal(Buffer.from('#!/bin/sh\nrm -rf /\n'), 'setup.sh')).status).toBe(415);
  });

  it('refuses an empty file with 400', async () => {
    const error = await refusal('', 'empty.txt');
    expect(error.status).toBe(400);
  });
});
