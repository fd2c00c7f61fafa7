/**
 * Files in a folder (UPLOADS_DIR). A write goes to a temporary name in the key's own folder, is
 * flushed to disk (fsync), then renamed over the key: a rename within one file system is atomic,
 * so a crash mid-write leaves at worst a `.tmp-…` file (never listed, removed by the startup
 * reconcile), never half a file under a real key. Names starting with a dot are never keys.
 */
import { randomUUID } from 'node:crypto';
import type { Dirent } from 'node:fs';
import fsp from 'node:fs/promises';
import path from 'node:path';
import type { Readable } from 'node:stream';
import { assertSafeKey } from './keys';
import { StorageNotFoundError, type Storage, type StoredObject } from './port';

const TEMP_PREFIX = '.tmp-';

const isMissing = (error: unknown) => (error as NodeJS.ErrnoException | undefined)?.code === 'ENOENT';

export class LocalStorage implements Storage {
  readonly description: string;

  constructor(private readonly root: string) {
    this.description = `folder ${root}`;
  }

  private pathOf(key: string): string {
    assertSafeKey(key);
    return path.join(this.root, ...key.split('/'));
  }

  async put(key: string, data: Buffer | Readable, _contentType: string): Promise<void> {
    const target = this.pathOf(key);
    const dir = path.dirname(target);
    await fsp.mkdir(dir, { recursive: true });
    const temp = path.join(dir, `${TEMP_PREFIX}${randomUUID()}`);
    try {
      const handle = await fsp.open(temp, 'wx', 0o640);
      try {
        if (Buffer.isBuffer(data)) await handle.writeFile(data);
        // writeFile on a handle writes all of it from the current position (write() may write less).
        else
          for await (const chunk of data)
            await handle.writeFile(typeof chunk === 'string' ? Buffer.from(chunk) : (chunk as Uint8Array));
        await handle.sync();
      } finally {
        await handle.close();
      }
      await fsp.rename(temp, target);
    } catch (error) {
      await fsp.rm(temp, { force: true });
      throw error;
    }
    // The rename is durable only once the folder's entry is on disk too.
    const folder = await fsp.open(dir, 'r');
    try {
      await folder.sync();
    } finally {
      await folder.close();
    }
  }

  async get(key: string): Promise<StoredObject> {
    const file = this.pathOf(key);
    // Opened before answering, so a file removed in between fails here and not mid-stream.
    let handle: fsp.FileHandle;
    try {
      handle = await fsp.open(file, 'r');
    } catch (error) {
      if (isMissing(error)) throw new StorageNotFoundError(key);
      throw error;
    }
    const { size } = await handle.stat();
    return { body: handle.createReadStream(), bytes: size };
  }

  async exists(key: string): Promise<boolean> {
    return (await this.stat(key)) !== null;
  }

  async stat(key: string): Promise<{ bytes: number; modifiedAt: Date } | null> {
    try {
      const stats = await fsp.stat(this.pathOf(key));
      return stats.isFile() ? { bytes: stats.size, modifiedAt: stats.mtime } : null;
    } catch (error) {
      if (isMissing(error)) return null;
      throw error;
    }
  }

  async delete(key: string): Promise<void> {
    const file = this.pathOf(key);
    await fsp.rm(file, { force: true });
    // Variant folders (variants/<sha>/) go with their last file; a folder still in use stays.
    const dir = path.dirname(file);
    if (dir !== this.root && path.dirname(dir) !== this.root) await fsp.rmdir(dir).catch(() => {});
  }

  async *list(prefix: string): AsyncIterable<string> {
    // Start at the deepest folder the prefix names, and walk down from there.
    const folder = prefix.includes('/') ? prefix.slice(0, prefix.lastIndexOf('/')) : '';
    if (folder) assertSafeKey(`${folder}/x`);
    for await (const key of this.walk(folder)) if (key.startsWith(prefix)) yield key;
  }

  private async *walk(folder: string, includeHidden = false): AsyncIterable<string> {
    let entries: Dirent[];
    try {
      entries = await fsp.readdir(path.join(this.root, ...folder.split('/').filter(Boolean)), { withFileTypes: true });
    } catch (error) {
      if (isMissing(error)) return;
      throw error;
    }
    for (const entry of entries) {
      if (entry.name.startsWith('.') && !(includeHidden && entry.name.startsWith(TEMP_PREFIX))) continue;
      const key = folder ? `${folder}/${entry.name}` : entry.name;
      if (entry.isDirectory()) yield* this.walk(key, includeHidden);
      else if (entry.isFile()) yield key;
    }
  }

  async removeStaleTemporaryFiles(olderThan: Date): Promise<number> {
    let removed = 0;
    for await (const key of this.walk('', true)) {
      if (!path.posix.basename(key).startsWith(TEMP_PREFIX)) continue;
      const file = path.join(this.root, ...key.split('/'));
      const stats = await fsp.stat(file).catch(() => null);
      if (stats && stats.mtime < olderThan) {
        await fsp.rm(file, { force: true });
        removed++;
      }
    }
    return removed;
  }
}
