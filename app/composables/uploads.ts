/**
 * Photos and files: the upload itself (XMLHttpRequest, because fetch reports no upload progress),
 * waiting for the server to make the image variants, the other upload routes, and a queue of
 * uploads in progress that editors and the gallery show with a progress bar and a Cancel button.
 */
import type { ProjectDetail } from '@shared/contracts/projects';
import {
  attachmentTypes,
  imageTypes,
  missingAltTextSchema,
  type MissingAltText,
  type UpdateUpload,
  type Upload,
  type UploadList,
} from '@shared/contracts/uploads';
import { computed, getCurrentScope, onScopeDispose, reactive, ref } from 'vue';
import { ApiError, http, httpTransport } from './http';

const projectPath = (slug: string) => `/projects/${encodeURIComponent(slug)}`;

export interface UploadFileOptions {
  altText?: string;
  caption?: string;
  /** Share of the file sent so far, 0 to 1. */
  onProgress?: (fraction: number) => void;
  signal?: AbortSignal;
}

function abortError(): DOMException {
  return new DOMException('The upload was cancelled.', 'AbortError');
}

export function isAbort(error: unknown): boolean {
  return (error as Error | null)?.name === 'AbortError';
}

function parseJson(text: string): unknown {
  if (!text) return undefined;
  try {
    return JSON.parse(text);
  } catch {
    return undefined;
  }
}

/** What a failed upload answer means, in the server's words when it sent any. */
function uploadError(status: number, statusText: string, data: unknown): ApiError {
  const error = httpTransport.errorFromResponse(status, statusText, data);
  // A proxy in front of the server may refuse a large body before the server can say why.
  if (error.code === 'internal' && status === 413) {
    return new ApiError(413, 'payload_too_large', 'This file is larger than the server accepts.');
  }
  return error;
}

function sendOnce(
  slug: string,
  file: File,
  options: UploadFileOptions,
): Promise<{ status: number; data: unknown; statusText: string }> {
  return new Promise((resolve, reject) => {
    const { signal } = options;
    if (signal?.aborted) {
      reject(abortError());
      return;
    }
    const xhr = new XMLHttpRequest();
    const onAbort = () => xhr.abort();
    const finish = () => signal?.removeEventListener('abort', onAbort);
    xhr.open('POST', `/api${projectPath(slug)}/uploads`);
    xhr.withCredentials = true;
    xhr.setRequestHeader('Accept', 'application/json');
    const token = httpTransport.csrfToken();
    if (token) xhr.setRequestHeader('X-CSRF-Token', token);
    xhr.upload.onprogress = (event) => {
      if (event.lengthComputable && event.total > 0) options.onProgress?.(Math.min(1, event.loaded / event.total));
    };
    xhr.onload = () => {
      finish();
      resolve({ status: xhr.status, statusText: xhr.statusText, data: parseJson(xhr.responseText) });
    };
    xhr.onerror = () => {
      finish();
      reject(httpTransport.networkError());
    };
    xhr.ontimeout = xhr.onerror;
    xhr.onabort = () => {
      finish();
      reject(abortError());
    };
    signal?.addEventListener('abort', onAbort, { once: true });

    const form = new FormData();
    // Text fields first: the server reads them before the file arrives.
    if (options.altText) form.append('altText', options.altText);
    if (options.caption) form.append('caption', options.caption);
    form.append('file', file, file.name);
    xhr.send(form);
  });
}

/**
 * Sends one file to the project (one per request, so each has its own progress and can be
 * cancelled alone). Resolves with the new upload; rejects with an `ApiError` (413 too large or
 * over the quota, 415 a type Reworkbook does not keep, 400 a broken image) or an `AbortError`.
 */
export async function uploadFile(slug: string, file: File, options: UploadFileOptions = {}): Promise<Upload> {
  let answer = await sendOnce(slug, file, options);
  const { data } = answer;
  if (
    answer.status === 403 &&
    typeof data === 'object' &&
    (data as { error?: { code?: string } } | null)?.error?.code === 'csrf_failed'
  ) {
    // The token went stale (a new session): refresh it once and send again, as http.ts does.
    await httpTransport.refreshCsrf();
    options.onProgress?.(0);
    answer = await sendOnce(slug, file, options);
  }
  if (answer.status >= 200 && answer.status < 300) {
    const first = (answer.data as { items?: Upload[] } | undefined)?.items?.[0];
    if (!first) throw new ApiError(answer.status, 'internal', 'The server took the file but did not say where it is.');
    return first;
  }
  throw uploadError(answer.status, answer.statusText, answer.data);
}

/** The server could not read the file after taking it (a broken image, an unreadable ZIP). */
export class UploadProcessingError extends Error {
  override name = 'UploadProcessingError';
  constructor(readonly upload: Upload) {
    super(upload.failure || `Reworkbook could not read “${upload.name}”.`);
  }
}

/**
 * Whether an upload can be shown: it is ready, or (an image) the variant its Markdown points at
 * exists already — the larger ones may still be on their way.
 */
export function isUsable(upload: Upload): boolean {
  if (upload.state === 'ready') return true;
  if (upload.state === 'failed') return false;
  return upload.kind === 'image' && upload.variants.some((variant) => variant.url === upload.markdownUrl);
}

function delay(ms: number, signal?: AbortSignal): Promise<void> {
  return new Promise((resolve, reject) => {
    if (signal?.aborted) {
      reject(abortError());
      return;
    }
    const timer = setTimeout(() => {
      signal?.removeEventListener('abort', onAbort);
      resolve();
    }, ms);
    const onAbort = () => {
      clearTimeout(timer);
      reject(abortError());
    };
    signal?.addEventListener('abort', onAbort, { once: true });
  });
}

export interface WaitOptions {
  signal?: AbortSignal;
  /** What the server answered already (the upload's own answer), to skip the first request. */
  current?: Upload;
  /** First pause between polls; each pause is half as long again, up to `maxIntervalMs`. */
  intervalMs?: number;
  maxIntervalMs?: number;
  /** Give up after this long (the server's image job may be stuck). */
  timeoutMs?: number;
}

/**
 * Polls `GET /uploads/:id` until the upload is usable (see `isUsable`). Rejects with an
 * `UploadProcessingError` when the server gives up on the file, or an `AbortError`.
 */
export async function waitUntilReady(id: number, options: WaitOptions = {}): Promise<Upload> {
  const { signal, intervalMs = 400, maxIntervalMs = 2000, timeoutMs = 120_000 } = options;
  const started = Date.now();
  let current = options.current ?? (await http.get<Upload>(`/uploads/${id}`, { signal }));
  let pause = intervalMs;
  for (;;) {
    if (current.state === 'failed') throw new UploadProcessingError(current);
    if (isUsable(current)) return current;
    if (Date.now() - started > timeoutMs) {
      throw new ApiError(
        503,
        'service_unavailable',
        `The server is still preparing “${current.name}”. Try again later.`,
      );
    }
    await delay(pause, signal);
    pause = Math.min(maxIntervalMs, Math.round(pause * 1.5));
    current = await http.get<Upload>(`/uploads/${id}`, { signal });
  }
}

/** The cover photo a project carries (`ProjectDetail.cover` and `ProjectCard.cover`). */
export interface CoverPhoto {
  url: string;
  srcset: string | null;
  sizes: string | null;
  width: number | null;
  height: number | null;
  altText: string;
}

/** The project's cover photo, or null when it has none (or the server does not send one yet). */
export function coverOf(project: object): CoverPhoto | null {
  return (project as { cover?: CoverPhoto | null }).cover ?? null;
}

export const uploadsApi = {
  list: (slug: string) => http.get<UploadList>(`${projectPath(slug)}/uploads`),
  get: (id: number) => http.get<Upload>(`/uploads/${id}`),
  update: (id: number, input: UpdateUpload) => http.patch<Upload>(`/uploads/${id}`, input),
  remove: (id: number) => http.delete<void>(`/uploads/${id}`),
  setCover: (slug: string, uploadId: number | null) =>
    http.put<ProjectDetail>(`${projectPath(slug)}/cover`, { uploadId }),
};

/** The images a publish refused for lacking alt text, or null when the error is something else. */
export function missingAltTextOf(error: unknown): MissingAltText | null {
  if (!(error instanceof ApiError) || error.code !== 'validation_failed') return null;
  const parsed = missingAltTextSchema.safeParse(error.details);
  return parsed.success && parsed.data.images.length > 0 ? parsed.data : null;
}

/** What file pickers offer (types and extensions, as systems label files differently); the server decides. */
export const UPLOAD_ACCEPT = [
  ...imageTypes,
  ...attachmentTypes,
  ...['.jpg', '.jpeg', '.png', '.webp', '.avif', '.gif', '.pdf', '.zip', '.txt', '.csv'],
].join(',');

/** Whether the file is a photo the server turns into variants (shown inline), not an attachment. */
export function isImageFile(file: { type: string }): boolean {
  return (imageTypes as readonly string[]).includes(file.type);
}

/** "840 kB", "3.2 MB": decimal units, as file managers and phones show them. */
export function formatBytes(bytes: number): string {
  if (bytes < 1000) return `${bytes} B`;
  const units = ['kB', 'MB', 'GB'];
  let value = bytes / 1000;
  let unit = 0;
  while (value >= 1000 && unit < units.length - 1) {
    value /= 1000;
    unit++;
  }
  return `${value >= 100 ? Math.round(value) : value.toFixed(1).replace(/\.0$/, '')} ${units[unit]}`;
}

// --- the queue -------------------------------------------------------------------------------

export type QueuedUploadState = 'uploading' | 'processing' | 'ready' | 'failed' | 'cancelled';

export interface QueuedUpload {
  /** Local key, unique in the page. */
  key: string;
  name: string;
  size: number;
  type: string;
  isImage: boolean;
  /** Share sent, 0 to 1. */
  fraction: number;
  state: QueuedUploadState;
  /** Why it failed, in words for the writer. */
  error: string | null;
  upload: Upload | null;
  /** Aborts the request (or the wait for the variants) and drops the entry. */
  cancel(): void;
  /** Resolves with the usable upload; rejects with the error (an AbortError when cancelled). */
  done: Promise<Upload>;
}

export interface QueueAddOptions {
  altText?: string;
  caption?: string;
  onProgress?: (fraction: number) => void;
}

export interface UploadQueueOptions {
  /** Keep entries that finished (the gallery drops them itself when it has reloaded). */
  keepFinished?: boolean;
}

let nextKey = 1;

function describeFailure(error: unknown): string {
  if (error instanceof ApiError || error instanceof UploadProcessingError) return error.message;
  if (error instanceof Error && error.message) return `Something went wrong: ${error.message}`;
  return 'Something went wrong.';
}

/**
 * Uploads in progress, for one page or editor. Entries leave the list when they are ready (unless
 * `keepFinished`) or cancelled; failed ones stay, with the reason, until dismissed. Leaving the
 * page cancels whatever is still running.
 */
export function useUploadQueue(queueOptions: UploadQueueOptions = {}) {
  const items = ref<QueuedUpload[]>([]);
  const running = new Map<string, Promise<unknown>>();

  function drop(key: string) {
    items.value = items.value.filter((item) => item.key !== key);
  }

  function add(slug: string, file: File, options: QueueAddOptions = {}): QueuedUpload {
    const controller = new AbortController();
    const key = `upload-${nextKey++}`;
    let settle!: { resolve: (u: Upload) => void; reject: (e: unknown) => void };
    const done = new Promise<Upload>((resolve, reject) => {
      settle = { resolve, reject };
    });
    // Callers that only watch the entry must not see an unhandled rejection.
    done.catch(() => {});
    const item = reactive<QueuedUpload>({
      key,
      name: file.name || 'pasted file',
      size: file.size,
      type: file.type,
      isImage: isImageFile(file),
      fraction: 0,
      state: 'uploading',
      error: null,
      upload: null,
      cancel: () => {
        if (item.state === 'ready' || item.state === 'failed' || item.state === 'cancelled') return;
        item.state = 'cancelled';
        controller.abort();
        drop(key);
      },
      done,
    }) as QueuedUpload;
    items.value = [...items.value, item];

    const work = (async () => {
      try {
        const created = await uploadFile(slug, file, {
          altText: options.altText,
          caption: options.caption,
          signal: controller.signal,
          onProgress: (fraction) => {
            item.fraction = fraction;
            options.onProgress?.(fraction);
          },
        });
        item.fraction = 1;
        item.upload = created;
        item.state = 'processing';
        const usable = await waitUntilReady(created.id, { current: created, signal: controller.signal });
        item.upload = usable;
        item.state = 'ready';
        if (!queueOptions.keepFinished) drop(key);
        settle.resolve(usable);
      } catch (error) {
        if (isAbort(error) || controller.signal.aborted) {
          item.state = 'cancelled';
          drop(key);
          settle.reject(isAbort(error) ? error : abortError());
          return;
        }
        item.state = 'failed';
        item.error = describeFailure(error);
        settle.reject(error);
      } finally {
        running.delete(key);
      }
    })();
    running.set(key, work);
    return item;
  }

  function dismiss(key: string) {
    const item = items.value.find((entry) => entry.key === key);
    if (item && (item.state === 'uploading' || item.state === 'processing')) item.cancel();
    else drop(key);
  }

  function cancelAll() {
    for (const item of [...items.value]) item.cancel();
  }

  /** Resolves once nothing is uploading any more (whatever the outcome). */
  async function settled(): Promise<void> {
    while (running.size > 0) await Promise.allSettled([...running.values()]);
  }

  const busy = computed(() => items.value.some((item) => item.state === 'uploading' || item.state === 'processing'));
  const count = computed(
    () => items.value.filter((item) => item.state === 'uploading' || item.state === 'processing').length,
  );

  if (getCurrentScope()) onScopeDispose(cancelAll);

  return { items, busy, count, add, dismiss, cancelAll, settled };
}
