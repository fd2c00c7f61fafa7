/**
 * A local S3-compatible server (s3rver) on loopback, with one bucket, for the tests of the S3
 * storage adapter: the adapter speaks the real protocol (signed requests, PutObject, ListObjectsV2 …)
 * to it. It does not enforce everything a hosted service does (it accepts any signature), so it
 * proves the protocol and the adapter's behaviour, not the credentials. s3rver is a development dependency, so it is loaded only when a fake is started.
 */
import fs from 'node:fs';
import { createRequire } from 'node:module';
import os from 'node:os';
import path from 'node:path';

/** The slice of s3rver's API used here (the package ships no types). */
interface S3rverInstance {
  run(): Promise<{ address: string; port: number }>;
  close(): Promise<void>;
}
type S3rverConstructor = new (options: {
  address: string;
  port: number;
  silent: boolean;
  directory: string;
  configureBuckets: { name: string }[];
}) => S3rverInstance;

export interface RunningFakeS3 {
  /** The endpoint (S3_ENDPOINT). */
  url: string;
  bucket: string;
  /** s3rver's fixed credentials. */
  accessKeyId: string;
  secretAccessKey: string;
  /** Configuration variables that point the app at this fake. */
  env: Record<string, string>;
  close(): Promise<void>;
}

export async function startFakeS3(
  options: { bucket?: string; port?: number; dir?: string } = {},
): Promise<RunningFakeS3> {
  const require = createRequire(import.meta.url);
  const S3rver = require('s3rver') as S3rverConstructor;
  const bucket = options.bucket ?? 'reworkbook-test';
  const directory = options.dir ?? fs.mkdtempSync(path.join(os.tmpdir(), 'rwb-fake-s3-'));
  const server = new S3rver({
    address: '127.0.0.1',
    port: options.port ?? 0,
    silent: true,
    directory,
    configureBuckets: [{ name: bucket }],
  });
  const { port } = await server.run();
  const url = `http://127.0.0.1:${port}`;
  const accessKeyId = 'S3RVER';
  const secretAccessKey = 'S3RVER';
  return {
    url,
    bucket,
    accessKeyId,
    secretAccessKey,
    env: {
      S3_ENDPOINT: url,
      S3_BUCKET: bucket,
      S3_REGION: 'us-east-1',
      S3_ACCESS_KEY_ID: accessKeyId,
      S3_SECRET_ACCESS_KEY: secretAccessKey,
    },
    async close() {
      await server.close();
      if (!options.dir) fs.rmSync(directory, { recursive: true, force: true });
    },
  };
}
