/**
 * Files in an S3-compatible bucket, through the AWS SDK v3. A PutObject is atomic by itself: the
 * key shows the old object or the whole new one, never a part. Path-style addressing works with
 * every S3-compatible service (and the local fake); checksums are only computed where the API
 * requires them, which every S3-compatible service accepts.
 */
import fs from 'node:fs';
import { Readable } from 'node:stream';
import {
  DeleteObjectCommand,
  GetObjectCommand,
  HeadObjectCommand,
  ListObjectsV2Command,
  NoSuchKey,
  NotFound,
  PutObjectCommand,
  S3Client,
  S3ServiceException,
} from '@aws-sdk/client-s3';
import { assertSafeKey } from './keys';
import { StorageNotFoundError, type Storage, type StoredObject } from './port';

export interface S3StorageOptions {
  bucket: string;
  region: string;
  /** Omitted: AWS's own endpoint for the region. */
  endpoint?: string;
  /** Omitted: the SDK's default credential chain (environment, instance role …). */
  credentials?: { accessKeyId: string; secretAccessKey: string };
}

const isNotFound = (error: unknown) =>
  error instanceof NoSuchKey ||
  error instanceof NotFound ||
  (error instanceof S3ServiceException && error.$metadata.httpStatusCode === 404);

export class S3Storage implements Storage {
  readonly description: string;
  private readonly client: S3Client;
  private readonly bucket: string;

  constructor(options: S3StorageOptions) {
    this.bucket = options.bucket;
    this.description = `bucket ${options.bucket}${options.endpoint ? ` at ${options.endpoint}` : ''}`;
    this.client = new S3Client({
      region: options.region,
      forcePathStyle: true,
      requestChecksumCalculation: 'WHEN_REQUIRED',
      responseChecksumValidation: 'WHEN_REQUIRED',
      ...(options.endpoint ? { endpoint: options.endpoint } : {}),
      ...(options.credentials ? { credentials: options.credentials } : {}),
    });
  }

  async put(key: string, data: Buffer | Readable, contentType: string): Promise<void> {
    assertSafeKey(key);
    // PutObject needs the length up front: a file stream is sized from its file, anything else
    // is read into memory first (our streams are at most one upload long).
    let body: Buffer | Readable = data;
    let length: number;
    if (Buffer.isBuffer(data)) length = data.length;
    else if (data instanceof fs.ReadStream && typeof data.path === 'string')
      length = (await fs.promises.stat(data.path)).size;
    else {
      const chunks: Buffer[] = [];
      for await (const chunk of data) chunks.push(Buffer.isBuffer(chunk) ? chunk : Buffer.from(chunk as Uint8Array));
      body = Buffer.concat(chunks);
      length = body.length;
    }
    await this.client.send(
      new PutObjectCommand({
        Bucket: this.bucket,
        Key: key,
        Body: body,
        ContentType: contentType,
        ContentLength: length,
      }),
    );
  }

  async get(key: string): Promise<StoredObject> {
    assertSafeKey(key);
    try {
      const answer = await this.client.send(new GetObjectCommand({ Bucket: this.bucket, Key: key }));
      if (!(answer.Body instanceof Readable)) throw new Error(`GetObject ${key} answered without a stream`);
      return { body: answer.Body, bytes: answer.ContentLength ?? 0 };
    } catch (error) {
      if (isNotFound(error)) throw new StorageNotFoundError(key);
      throw error;
    }
  }

  async exists(key: string): Promise<boolean> {
    return (await this.stat(key)) !== null;
  }

  async stat(key: string): Promise<{ bytes: number; modifiedAt: Date } | null> {
    assertSafeKey(key);
    try {
      const head = await this.client.send(new HeadObjectCommand({ Bucket: this.bucket, Key: key }));
      return { bytes: head.ContentLength ?? 0, modifiedAt: head.LastModified ?? new Date(0) };
    } catch (error) {
      if (isNotFound(error)) return null;
      throw error;
    }
  }

  async delete(key: string): Promise<void> {
    assertSafeKey(key);
    await this.client.send(new DeleteObjectCommand({ Bucket: this.bucket, Key: key }));
  }

  async *list(prefix: string): AsyncIterable<string> {
    let token: string | undefined;
    do {
      const page = await this.client.send(
        new ListObjectsV2Command({
          Bucket: this.bucket,
          Prefix: prefix,
          ...(token ? { ContinuationToken: token } : {}),
        }),
      );
      for (const object of page.Contents ?? []) if (object.Key) yield object.Key;
      token = page.IsTruncated ? page.NextContinuationToken : undefined;
    } while (token);
  }

  /** A PutObject never leaves a partial object behind: nothing to clean. */
  async removeStaleTemporaryFiles(): Promise<number> {
    return 0;
  }

  close(): void {
    this.client.destroy();
  }
}
