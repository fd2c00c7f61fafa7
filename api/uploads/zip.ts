/**
 * What a ZIP holds, read from its central directory with yauzl — nothing is ever decompressed
 * or extracted on the server. The listing is kept for the gallery (names and sizes, at most
 * MAX_LISTED entries), and ZIPs a reader would regret opening are refused:
 *
 * - more than MAX_ENTRIES entries, or more than MAX_DECLARED_BYTES uncompressed in all (a
 *   "ZIP bomb": small to download, huge to unpack);
 * - entries with absolute paths or `..` segments (a "zip slip": unpacking writes outside the
 *   target folder), which yauzl's file name check reports;
 * - symbolic links (unpacked, they point anywhere on the reader's disk).
 *
 * OWASP File Upload Cheat Sheet, "Upload and Download Limits" (the size after decompression
 * counts) and "File Content Validation" (ZIP files carry every kind of file); OWASP ASVS 5.0
 * requirements 5.2.3 (uncompressed size and number of files checked before unpacking), 5.2.5 (no
 * symlinks in archives) and 5.3.3 (user-provided paths in archives are not followed).
 */
import yauzl from 'yauzl';
import { AppError } from '../http/errors';

export const MAX_LISTED = 2_000;
export const MAX_ENTRIES = 50_000;
export const MAX_DECLARED_BYTES = 2 * 1024 ** 3;

export interface ZipListing {
  entries: { name: string; bytes: number; compressedBytes: number }[];
  /** True when the ZIP has more than MAX_LISTED entries: only the first ones are listed. */
  entriesTruncated: boolean;
  entryCount: number;
  declaredBytes: number;
}

const refused = (message: string, details?: unknown) => new AppError('unsupported_media_type', message, details);

export async function listZip(file: string): Promise<ZipListing> {
  let zip: yauzl.ZipFile;
  try {
    zip = await yauzl.openPromise(file, { lazyEntries: true, autoClose: false, decodeStrings: true, strictFileNames: false });
  } catch (error) {
    throw new AppError('bad_request', 'This ZIP file could not be read: it is damaged or incomplete.', {
      reason: (error as Error).message,
    });
  }
  try {
    if (zip.entryCount > MAX_ENTRIES) {
      throw refused(`This ZIP holds ${zip.entryCount.toLocaleString('en')} files; at most ${MAX_ENTRIES.toLocaleString('en')} are allowed.`, {
        entryCount: zip.entryCount,
      });
    }
    const listing: ZipListing = { entries: [], entriesTruncated: false, entryCount: zip.entryCount, declaredBytes: 0 };
    await new Promise<void>((resolve, reject) => {
      zip.on('entry', (entry: yauzl.Entry) => {
        listing.declaredBytes += entry.uncompressedSize;
        if (listing.declaredBytes > MAX_DECLARED_BYTES) {
          reject(
            refused(
              `This ZIP would unpack to more than ${MAX_DECLARED_BYTES / 1024 ** 3} GB. Archives that large (or that claim to be) are refused.`,
              { declaredBytes: listing.declaredBytes, limitBytes: MAX_DECLARED_BYTES },
            ),
          );
          return;
        }
        // Unix file type in the high half of the external attributes: 0o120000 is a symbolic link.
        if (((entry.externalFileAttributes >>> 16) & 0o170000) === 0o120000) {
          reject(refused('This ZIP contains symbolic links, which could point anywhere once unpacked. Archive the files themselves.'));
          return;
        }
        if (listing.entries.length < MAX_LISTED) {
          listing.entries.push({ name: entry.fileName, bytes: entry.uncompressedSize, compressedBytes: entry.compressedSize });
        } else listing.entriesTruncated = true;
        zip.readEntry();
      });
      zip.once('end', () => resolve());
      zip.once('error', (error: Error) =>
        reject(
          /invalid relative path|absolute path|invalid characters/i.test(error.message)
            ? refused('This ZIP lists files outside its own folder (absolute paths or ".."), which unpacking would write elsewhere.', {
                reason: error.message,
              })
            : new AppError('bad_request', 'This ZIP file could not be read: it is damaged or incomplete.', { reason: error.message }),
        ),
      );
      zip.readEntry();
    });
    return listing;
  } finally {
    zip.close();
  }
}
