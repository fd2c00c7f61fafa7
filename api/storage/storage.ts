/** Picks the storage adapter from the configuration (see port.ts for the contract). */
import type { Config } from '../config';
import { LocalStorage } from './local';
import { S3Storage } from './s3';
import type { Storage } from './port';

export * from './port';

export function createStorage(config: Config): Storage {
  if (config.useS3) {
    return new S3Storage({
      bucket: config.S3_BUCKET!,
      region: config.S3_REGION,
      ...(config.S3_ENDPOINT ? { endpoint: config.S3_ENDPOINT } : {}),
      ...(config.S3_ACCESS_KEY_ID && config.S3_SECRET_ACCESS_KEY
        ? { credentials: { accessKeyId: config.S3_ACCESS_KEY_ID, secretAccessKey: config.S3_SECRET_ACCESS_KEY } }
        : {}),
    });
  }
  return new LocalStorage(config.uploadsDir);
}
