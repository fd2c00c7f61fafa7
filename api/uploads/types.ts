/**
 * The file types we take, and how each is recognised: by its content, never by the name or the
 * Content-Type the client sent. Everything else — SVG above all, which is a document that can run
 * script — is refused with 415.
 *
 * OWASP File Upload Cheat Sheet, "List Allowed Extensions", "Content-Type Validation" (the
 * client's type is not trusted) and "File Signature Validation"; OWASP ASVS 5.0 requirement 5.2.2
 * (the extension must be an expected one and the content must be of the type it names).
 */
import fs from 'node:fs';
import { fileTypeFromFile } from 'file-type/node';
import type { imageTypes, attachmentTypes } from '../../shared/contracts/uploads';
import { AppError } from '../http/errors';

export type ImageMime = (typeof imageTypes)[number];
export type AttachmentMime = (typeof attachmentTypes)[number];
export type SharpFormat = 'jpeg' | 'png' | 'webp' | 'avif' | 'gif';

export interface FileKind {
  kind: 'image' | 'attachment';
  mime: ImageMime | AttachmentMime;
  /** The extension we serve the original under (first of `extensions`). */
  ext: string;
  /** Extensions a display name may keep for this type. */
  extensions: readonly string[];
  /** Images: the format sharp decodes and re-encodes. */
  format?: SharpFormat;
}

export const IMAGE_KINDS: Record<ImageMime, FileKind> = {
  'image/jpeg': { kind: 'image', mime: 'image/jpeg', ext: 'jpg', extensions: ['jpg', 'jpeg', 'jpe'], format: 'jpeg' },
  'image/png': { kind: 'image', mime: 'image/png', ext: 'png', extensions: ['png'], format: 'png' },
  'image/webp': { kind: 'image', mime: 'image/webp', ext: 'webp', extensions: ['webp'], format: 'webp' },
  'image/avif': { kind: 'image', mime: 'image/avif', ext: 'avif', extensions: ['avif'], format: 'avif' },
  'image/gif': { kind: 'image', mime: 'image/gif', ext: 'gif', extensions: ['gif'], format: 'gif' },
};

export const ATTACHMENT_KINDS: Record<AttachmentMime, FileKind> = {
  'application/pdf': { kind: 'attachment', mime: 'application/pdf', ext: 'pdf', extensions: ['pdf'] },
  'application/zip': { kind: 'attachment', mime: 'application/zip', ext: 'zip', extensions: ['zip'] },
  'text/plain': { kind: 'attachment', mime: 'text/plain', ext: 'txt', extensions: ['txt', 'text', 'log', 'md'] },
  'text/csv': { kind: 'attachment', mime: 'text/csv', ext: 'csv', extensions: ['csv'] },
};

export const KIND_BY_MIME: Readonly<Record<string, FileKind>> = { ...IMAGE_KINDS, ...ATTACHMENT_KINDS };

/** The extension of a served original, per stored type. */
export const extensionOf = (mime: string): string => KIND_BY_MIME[mime]?.ext ?? 'bin';

/** Served types: text gets its charset, since we checked it is UTF-8. */
export const servedContentType = (mime: string): string =>
  mime === 'text/plain' || mime === 'text/csv' ? `${mime}; charset=utf-8` : mime;

const refused = (message: string) => new AppError('unsupported_media_type', message, { accepted: acceptedList });
const acceptedList = 'JPEG, PNG, WebP, AVIF or GIF photos; PDF, ZIP, plain text (.txt) or CSV files';

/** Lower-case extension of a client's file name ('' without one). */
export function extensionOfName(name: string): string {
  const base = name.split(/[/\\]/).pop() ?? '';
  const dot = base.lastIndexOf('.');
  return dot > 0 ? base.slice(dot + 1).toLowerCase() : '';
}

/** Markup a browser or a viewer would interpret (SVG, HTML, XML) must not pass as "text". */
const MARKUP_START = /^\s*<(?:\?xml|svg|!doctype|html|head|body|script|iframe|object|embed|math)\b/i;

export interface TextCheck {
  ok: boolean;
  reason?: string;
}

/**
 * Text rules: valid UTF-8 (a BOM is fine), no NUL anywhere, and not markup. Streams the file,
 * so a large CSV costs no memory.
 */
export async function checkText(file: string): Promise<TextCheck> {
  const decoder = new TextDecoder('utf-8', { fatal: true });
  let head = '';
  try {
    for await (const chunk of fs.createReadStream(file, { highWaterMark: 64 * 1024 })) {
      const bytes = chunk as Buffer;
      if (bytes.includes(0)) return { ok: false, reason: 'contains NUL bytes' };
      const text = decoder.decode(bytes, { stream: true });
      if (head.length < 1024) head += text.slice(0, 1024);
    }
    decoder.decode();
  } catch (error) {
    if (error instanceof TypeError) return { ok: false, reason: 'is not UTF-8 text' };
    throw error;
  }
  if (MARKUP_START.test(head.replace(/^\uFEFF/, ''))) return { ok: false, reason: 'is markup (SVG, HTML or XML)' };
  return { ok: true };
}

/**
 * What a stored upload is, from its bytes. Binary types by their magic numbers (file-type);
 * text only when the name says .txt/.csv (and the like) *and* the bytes pass the text rules —
 * a name alone never makes anything an image, and a text file named `.jpg` is refused.
 */
export async function sniffFile(file: string, clientName: string, bytes: number): Promise<FileKind> {
  if (bytes === 0) throw new AppError('bad_request', 'The file is empty.');
  const detected = await fileTypeFromFile(file);
  if (detected) {
    const known = KIND_BY_MIME[detected.mime];
    if (known && known.kind === 'image') return known;
    if (known && (detected.mime === 'application/pdf' || detected.mime === 'application/zip')) return known;
    throw refused(`Files of type ${detected.mime} cannot be uploaded. Upload ${acceptedList}.`);
  }
  const ext = extensionOfName(clientName);
  if (ext === 'svg' || ext === 'svgz') {
    throw refused('SVG drawings cannot be uploaded: they can carry scripts. Export the drawing as PNG or PDF.');
  }
  const textKind = ext === 'csv' ? ATTACHMENT_KINDS['text/csv'] : ATTACHMENT_KINDS['text/plain'];
  if (!textKind.extensions.includes(ext)) {
    throw refused(`This file's content is not a type we take${ext ? ` (named .${ext})` : ''}. Upload ${acceptedList}.`);
  }
  const check = await checkText(file);
  if (!check.ok) throw refused(`This file is named .${ext} but ${check.reason}. Upload ${acceptedList}.`);
  return textKind;
}
