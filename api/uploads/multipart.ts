/**
 * Reading a multipart upload. This runs only after the route's access rule and CSRF check
 * passed (the route framework's `streamBody`), so an anonymous or token-less request is answered
 * before a byte of its body is stored.
 *
 * Files go to disk, never to memory: each request gets its own private folder
 * (`<UPLOADS_DIR>/.incoming/req-…`, mode 0700) that is removed when the response ends — after a
 * success, a refusal, or a client that went away mid-upload — and on startup if a crash left one.
 * Every multer limit is set (they all default to Infinity): file size, files, fields, parts,
 * field size, field name size, header pairs.
 *
 * OWASP File Upload Cheat Sheet, "Upload and Download Limits", "File Storage Location" (outside the
 * webroot), and the principles "Only allow authorized users to upload files" and "Protect the file
 * upload from CSRF attacks"; OWASP ASVS 5.0 requirement 5.2.1 (only sizes we can process).
 */
import { randomUUID } from 'node:crypto';
import fsp from 'node:fs/promises';
import path from 'node:path';
import type { Request, RequestHandler, Response } from 'express';
import multer from 'multer';
import type { Config } from '../config';
import { AppError } from '../http/errors';

export const MAX_FILES = 10;
export const MAX_FIELDS = 5;
/** Alt text and caption are at most 300 characters; 4 bytes each in UTF-8 at worst. */
export const MAX_FIELD_BYTES = 1_200;
export const FILE_FIELD = 'file';

export const incomingRoot = (config: Pick<Config, 'uploadsDir'>) => path.join(config.uploadsDir, '.incoming');

export interface IncomingUpload {
  dir: string;
  files: Express.Multer.File[];
  fields: Record<string, unknown>;
}

const INCOMING = Symbol('reworkbook.incoming');

type WithIncoming = Response & { [INCOMING]?: IncomingUpload };

export function incomingOf(res: Response): IncomingUpload {
  const incoming = (res as WithIncoming)[INCOMING];
  if (!incoming) throw new Error('incomingOf() used on a route without multipartFiles()');
  return incoming;
}

const mib = (bytes: number) => `${(bytes / 1024 / 1024).toLocaleString('en', { maximumFractionDigits: 1 })} MB`;

function translate(error: unknown, largestFile: number): unknown {
  if (error instanceof multer.MulterError) {
    switch (error.code) {
      case 'LIMIT_FILE_SIZE':
        return new AppError('payload_too_large', `A file is larger than ${mib(largestFile)}, the most any upload may be.`, {
          limitBytes: largestFile,
        });
      case 'LIMIT_FILE_COUNT':
        return new AppError('payload_too_large', `Send at most ${MAX_FILES} files at once.`, { limitFiles: MAX_FILES });
      case 'LIMIT_FIELD_COUNT':
      case 'LIMIT_PART_COUNT':
        return new AppError('payload_too_large', `The form has too many fields; send the files with at most ${MAX_FIELDS} other fields.`, {
          limitFields: MAX_FIELDS,
        });
      case 'LIMIT_FIELD_VALUE':
        return new AppError('payload_too_large', `A form field is longer than ${MAX_FIELD_BYTES} bytes.`);
      case 'LIMIT_UNEXPECTED_FILE':
        return new AppError('bad_request', `Send files in the form field "${FILE_FIELD}".`);
      default:
        return new AppError('bad_request', `The form could not be read (${error.message}).`);
    }
  }
  const message = (error as Error | undefined)?.message ?? '';
  if (/request (aborted|closed)|unexpected end of form|malformed|multipart/i.test(message)) {
    return new AppError('bad_request', 'The upload did not arrive complete.');
  }
  return error;
}

/** The streamBody middleware of the upload route. */
export function multipartFiles(config: Config): RequestHandler {
  const largestFile = Math.max(config.uploadLimits.imageBytes, config.uploadLimits.attachmentBytes);
  const root = incomingRoot(config);
  return async (req: Request, res: Response, next) => {
    if (!req.is('multipart/form-data')) {
      next(new AppError('unsupported_media_type', 'Send the files as multipart/form-data.'));
      return;
    }
    let dir: string;
    try {
      await fsp.mkdir(root, { recursive: true, mode: 0o700 });
      dir = await fsp.mkdtemp(path.join(root, 'req-'));
    } catch (error) {
      next(error);
      return;
    }
    // 'close' comes after the response is sent, or when the client goes away: either way the
    // request's files are no longer needed.
    res.once('close', () => void fsp.rm(dir, { recursive: true, force: true }));
    const upload = multer({
      storage: multer.diskStorage({ destination: dir, filename: (_req, _file, cb) => cb(null, randomUUID()) }),
      // Browsers send file names as UTF-8 without saying so.
      defParamCharset: 'utf8',
      limits: {
        fileSize: largestFile,
        files: MAX_FILES,
        fields: MAX_FIELDS,
        parts: MAX_FILES + MAX_FIELDS,
        fieldSize: MAX_FIELD_BYTES,
        fieldNameSize: 100,
        headerPairs: 20,
      },
    }).array(FILE_FIELD, MAX_FILES);
    upload(req, res, (error?: unknown) => {
      if (error) {
        next(translate(error, largestFile));
        return;
      }
      const incoming: IncomingUpload = {
        dir,
        files: (req.files as Express.Multer.File[] | undefined) ?? [],
        fields: { ...(req.body as Record<string, unknown>) },
      };
      (res as WithIncoming)[INCOMING] = incoming;
      next();
    });
  };
}

/** Folders of requests a crash interrupted (older than `olderThan`). */
export async function removeStaleIncoming(config: Pick<Config, 'uploadsDir'>, olderThan: Date): Promise<number> {
  const root = incomingRoot(config);
  const names = await fsp.readdir(root).catch(() => [] as string[]);
  let removed = 0;
  for (const name of names) {
    const dir = path.join(root, name);
    const stats = await fsp.stat(dir).catch(() => null);
    if (stats && stats.mtime < olderThan) {
      await fsp.rm(dir, { recursive: true, force: true });
      removed++;
    }
  }
  return removed;
}
