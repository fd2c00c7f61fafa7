/**
 * The S3 storage adapter against a local S3-compatible server (s3rver, started here on loopback):
 * the same contract as the local folder, content-addressed dedup, and the product serving photos
 * from it when configured with the S3_* variables only.
 *
 * OWASP File Upload Cheat Sheet, "File Storage Location" ("Store the files on a different host");
 * OWASP ASVS 5.0 requirement 5.3.2 (keys come from the content, never from a client's name).
 */
import { ListObjectsV2Command, S3Client } from '@aws-sdk/client-s3';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startFakeS3, type RunningFakeS3 } from '../../api/fakes/s3';
import { S3Storage } from '../../api/storage/s3';
import { processUploadVariants, sweepUploads } from '../../api/uploads/jobs';
import type { Upload } from '../../shared/contracts/uploads';
import { createTestApp, type TestApp } from '../setup/app';
import { jpegWithGps } from '../fixtures/uploads/files';
import { multipartBody } from '../fixtures/uploads/multipart';
import { storageContract } from '../unit/uploads/server-storage-contract';

let fake: RunningFakeS3;
let storage: S3Storage;

beforeAll(async () => {
  fake = await startFakeS3();
  storage = new S3Storage({
    bucket: fake.bucket,
    region: 'us-east-1',
    endpoint: fake.url,
    credentials: { accessKeyId: fake.accessKeyId, secretAccessKey: fake.secretAccessKey },
  });
});
afterAll(async () => {
  storage?.close();
  await fake?.close();
});

/** Every key in the bucket, read with the SDK directly rather than through the adapter. */
async function bucketKeys(): Promise<string[]> {
  const client = new S3Client({
    endpoint: fake.url,
    region: 'us-east-1',
    forcePathStyle: true,
    credentials: { accessKeyId: fake.accessKeyId, secretAccessKey: fake.secretAccessKey },
    requestChecksumCalculation: 'WHEN_REQUIRED',
    responseChecksumValidation: 'WHEN_REQUIRED',
  });
  try {
    const answer = await client.send(new ListObjectsV2Command({ Bucket: fake.bucket }));
    return (answer.Contents ?? []).map((o) => o.Key!).sort();
  } finally {
    client.destroy();
  }
}

describe('S3Storage keeps the storage contract', () => {
  storageContract(() => storage);
});

describe('the product on S3 storage', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await createTestApp({ env: fake.env });
  });
  afterAll(async () => {
    await t?.close();
  });

  it('stores uploads in the bucket once per content, serves them, and the sweep removes them there', async () => {
    expect(t.ctx.storage.description).toContain(`bucket ${fake.bucket}`);
    const maker = await t.signIn('ilse-marrow');
    const photo = await jpegWithGps(1500, 1000);
    // The contract tests above share the bucket: only what this test adds counts.
    const before = new Set(await bucketKeys());
    const added = async () => (await bucketKeys()).filter((k) => !before.has(k));
    const upload = async (name: string) => {
      const { body, contentType } = multipartBody([{ name: 'file', filename: name, data: photo, type: 'image/jpeg' }]);
      const res = await maker.agent
        .post('/api/projects/greenhouse-vent-controller/uploads')
        .set(maker.headers)
        .set('Content-Type', contentType)
        .send(body)
        .expect(201);
      return res.body.items[0] as Upload;
    };
    const first = await upload('vent on wall.jpg');
    expect(await processUploadVariants(t.ctx, first.id)).toBe('ready');
    const second = await upload('same photo again.jpg');
    expect(second.state).toBe('ready');

    const keys = await added();
    const originals = keys.filter((k) => k.startsWith('originals/'));
    expect(originals).toHaveLength(1);
    expect(keys.filter((k) => k.startsWith('variants/'))).toHaveLength(6);

    const ready = (await maker.agent.get(`/api/uploads/${first.id}`).expect(200)).body as Upload;
    for (const url of [ready.url, ...ready.variants.map((v) => v.url)]) {
      const res = await t
        .agent()
        .get(url)
        .buffer(true)
        .parse((r, callback) => {
          const chunks: Buffer[] = [];
          r.on('data', (c: Buffer) => chunks.push(c));
          r.on('end', () => callback(null, Buffer.concat(chunks)));
        })
        .expect(200);
      const meta = await sharp(res.body as Buffer).metadata();
      expect(meta.exif, url).toBeUndefined();
      expect(Number(res.headers['content-length'])).toBe((res.body as Buffer).length);
    }

    // Nothing references either upload: past the grace period both go, and so do the objects.
    await sweepUploads(t.ctx, new Date(Date.now() + 25 * 3_600_000));
    expect((await maker.agent.get(`/api/uploads/${first.id}`)).status).toBe(404);
    expect(await added()).toEqual([]);
  });
});
