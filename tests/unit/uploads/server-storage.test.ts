/**
 * The local storage adapter: the port's contract, and atomic writes — a write that fails half-way
 * (a crash, a disk error, a client gone) never leaves part of a file under a real key.
 *
 * OWASP File Upload Cheat Sheet, "File Storage Location" (outside the webroot) and "Filesystem
 * Permissions"; OWASP ASVS 5.0 requirement 5.3.2 (paths come from internally generated data).
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Readable } from 'node:stream';
import { afterAll, describe, expect, it } from 'vitest';
import { LocalStorage } from '../../../api/storage/local';
import { originalKey } from '../../../api/storage/keys';
import { storageContract } from './server-storage-contract';

const root = fs.mkdtempSync(path.join(os.tmpdir(), 'rwb-local-storage-'));
const storage = new LocalStorage(root);
afterAll(() => fs.rmSync(root, { recursive: true, force: true }));

const everything = (dir: string): string[] =>
  fs.readdirSync(dir, { withFileTypes: true }).flatMap((e) => (e.isDirectory() ? everything(path.join(dir, e.name)) : [path.join(dir, e.name)]));

describe('LocalStorage keeps the storage contract', () => {
  storageContract(() => storage);
});

describe('LocalStorage writes atomically', () => {
  const key = originalKey('a'.repeat(64));

  it('leaves neither the key nor a temporary file when the data stream fails half-way', async () => {
    const failing = new Readable({
      read() {
        this.push(Buffer.alloc(64 * 1024, 7));
        this.destroy(new Error('connection reset mid-upload'));
      },
    });
    await expect(storage.put(key, failing, 'image/jpeg')).rejects.toThrow(/connection reset/);
    expect(await storage.exists(key)).toBe(false);
    expect(everything(root).filter((f) => f.includes('.tmp-'))).toEqual([]);
  });

  it('keeps the previous content when a replacement fails', async () => {
    await storage.put(key, Buffer.from('complete original'), 'image/jpeg');
    const failing = new Readable({
      read() {
        this.destroy(new Error('disk full'));
      },
    });
    await expect(storage.put(key, failing, 'image/jpeg')).rejects.toThrow(/disk full/);
    expect(fs.readFileSync(path.join(root, 'originals', 'a'.repeat(64)), 'utf8')).toBe('complete original');
  });

  it('never lists a temporary file, and removes stale ones on request', async () => {
    const stray = path.join(root, 'originals', '.tmp-left-by-a-crash');
    fs.writeFileSync(stray, 'half');
    const old = new Date(Date.now() - 2 * 3_600_000);
    fs.utimesSync(stray, old, old);
    const listed: string[] = [];
    for await (const k of storage.list('originals/')) listed.push(k);
    expect(listed.some((k) => k.includes('.tmp-'))).toBe(false);
    expect(await storage.removeStaleTemporaryFiles(new Date(Date.now() - 3_600_000))).toBe(1);
    expect(fs.existsSync(stray)).toBe(false);
  });

  it('writes files under the root only, in the key’s folder', async () => {
    const sha = 'b'.repeat(64);
    await storage.put(originalKey(sha), Buffer.from('x'), 'image/png');
    expect(fs.existsSync(path.join(root, 'originals', sha))).toBe(true);
  });
});
