/**
 * The storage port: where uploaded files live. Two adapters, chosen by configuration alone:
 * `LocalStorage` (a folder, the embedded default) and `S3Storage` (any S3-compatible service).
 * Writes are atomic: a key either holds a complete file or nothing.
 */
import type { Readable } from 'node:stream';

export interface StoredObject {
  body: Readable;
  bytes: number;
}

export interface Storage {
  /** Writes the whole of `data` under `key`, replacing what was there, atomically. */
  put(key: string, data: Buffer | Readable, contentType: string): Promise<void>;
  /** Throws StorageNotFoundError when nothing is stored under `key`. */
  get(key: string): Promise<StoredObject>;
  exists(key: string): Promise<boolean>;
  /** Removing a key that holds nothing is not an error. */
  delete(key: string): Promise<void>;
  /** Every key that starts with `prefix` (any order). */
  list(prefix: string): AsyncIterable<string>;
  /** Size and last change of a stored file, or null. Used to spare files written moments ago. */
  stat(key: string): Promise<{ bytes: number; modifiedAt: Date } | null>;
  /** Removes what interrupted writes left behind (before `olderThan`); adapters without any do nothing. */
  removeStaleTemporaryFiles(olderThan: Date): Promise<number>;
  /** Where the files are, for logs. */
  readonly description: string;
  /** Releases connections, if the adapter holds any. */
  close?(): void;
}

export class StorageNotFoundError extends Error {
  override name = 'StorageNotFoundError';
  constructor(readonly key: string) {
    super(`nothing is stored under ${key}`);
  }
}

/** Reads a stored object into memory (originals are at most the upload limit). */
export async function readAll(storage: Storage, key: string): Promise<Buffer> {
  const { body } = await storage.get(key);
  const chunks: Buffer[] = [];
  for await (const chunk of body) chunks.push(Buffer.isBuffer(chunk) ? chunk : Buffer.from(chunk as Uint8Array));
  return Buffer.concat(chunks);
}
