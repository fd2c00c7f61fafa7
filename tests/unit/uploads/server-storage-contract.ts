/**
 * What every storage adapter must do, as tests both adapters run: LocalStorage here in the unit
 * suite, S3Storage against the local S3-compatible server in tests/api/storage-s3.test.ts.
 */
import { createHash } from 'node:crypto';
import { Readable } from 'node:stream';
import { expect, it } from 'vitest';
import { StorageNotFoundError, readAll, type Storage } from '../../../api/storage/port';
import { originalKey, variantKey, variantPrefix } from '../../../api/storage/keys';

const digest = (text: string) => createHash('sha256').update(text).digest('hex');

async function collect(iterable: AsyncIterable<string>): Promise<string[]> {
  const keys: string[] = [];
  for await (const key of iterable) keys.push(key);
  return keys.sort();
}

export function storageContract(storage: () => Storage) {
  it('stores a buffer and gives it back with its length', async () => {
    const key = originalKey(digest('buffer'));
    await storage().put(key, Buffer.from('Rev A schematic'), 'application/pdf');
    const { body, bytes } = await storage().get(key);
    body.destroy();
    expect(bytes).toBe(15);
    expect((await readAll(storage(), key)).toString()).toBe('Rev A schematic');
  });

  it('stores a stream', async () => {
    const key = originalKey(digest('stream'));
    await storage().put(key, Readable.from([Buffer.from('part one, '), Buffer.from('part two')]), 'text/plain');
    expect((await readAll(storage(), key)).toString()).toBe('part one, part two');
  });

  it('says whether a key holds a file, with its size and age', async () => {
    const key = originalKey(digest('exists'));
    expect(await storage().exists(key)).toBe(false);
    expect(await storage().stat(key)).toBeNull();
    await storage().put(key, Buffer.alloc(1234, 1), 'application/octet-stream');
    expect(await storage().exists(key)).toBe(true);
    const stat = await storage().stat(key);
    expect(stat?.bytes).toBe(1234);
    expect(Math.abs(stat!.modifiedAt.getTime() - Date.now())).toBeLessThan(60_000);
  });

  it('answers a missing key with StorageNotFoundError', async () => {
    await expect(storage().get(originalKey(digest('never stored')))).rejects.toBeInstanceOf(StorageNotFoundError);
  });

  it('replaces what a key held, and deletes (deleting twice is fine)', async () => {
    const key = originalKey(digest('replace'));
    await storage().put(key, Buffer.from('first'), 'text/plain');
    await storage().put(key, Buffer.from('second'), 'text/plain');
    expect((await readAll(storage(), key)).toString()).toBe('second');
    await storage().delete(key);
    await storage().delete(key);
    expect(await storage().exists(key)).toBe(false);
  });

  it('lists keys by prefix', async () => {
    const sha = digest('listed');
    const keys = [variantKey(sha, 'thumb.webp'), variantKey(sha, 'page.webp'), variantKey(sha, 'page.jpg')];
    for (const key of keys) await storage().put(key, Buffer.from(key), 'image/webp');
    await storage().put(originalKey(sha), Buffer.from('original'), 'image/jpeg');
    expect(await collect(storage().list(variantPrefix(sha)))).toEqual([...keys].sort());
    expect(await collect(storage().list('originals/'))).toContain(originalKey(sha));
    expect(await collect(storage().list('originals/'))).not.toContain(keys[0]);
    for (const key of keys) await storage().delete(key);
    expect(await collect(storage().list(variantPrefix(sha)))).toEqual([]);
  });

  it('refuses keys that could leave its area', async () => {
    for (const key of ['../outside', 'originals/../../etc/passwd', '/absolute', 'originals/.hidden', '']) {
      await expect(storage().put(key, Buffer.from('x'), 'text/plain'), key).rejects.toThrow(/unsafe storage key/);
    }
  });
}
