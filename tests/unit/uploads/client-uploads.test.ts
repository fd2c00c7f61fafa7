// @vitest-environment happy-dom
/**
 * The upload client: one file per XMLHttpRequest with progress, the CSRF token and the session
 * cookie; the server's refusals (413, 415, 400) as ApiErrors carrying the server's own words;
 * cancel by AbortSignal; waiting for the image variants; and the queue a page shows.
 */
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { effectScope } from 'vue';
import { fakeApi, json } from '../errata/fake-api';
import { FakeXhr, installFakeXhr, tick } from './client-fake-xhr';
import { anUpload } from './client-fixtures';
import { ApiError, configureHttp } from '@/composables/http';
import {
  formatBytes,
  isUsable,
  missingAltTextOf,
  UploadProcessingError,
  uploadFile,
  useUploadQueue,
  waitUntilReady,
} from '@/composables/uploads';

let token = 'token-1';
const refreshCsrf = vi.fn(async () => {
  token = 'token-2';
});
const onUnauthenticated = vi.fn();

beforeEach(() => {
  token = 'token-1';
  refreshCsrf.mockClear();
  onUnauthenticated.mockClear();
  configureHttp({ csrfToken: () => token, refreshCsrf, onUnauthenticated });
  installFakeXhr();
});
afterEach(() => {
  vi.unstubAllGlobals();
});

const photo = () => new File([new Uint8Array(2048)], 'bodge wire.jpg', { type: 'image/jpeg' });
const refusal = (code: string, message: string) => ({ error: { code, message } });

describe('uploadFile', () => {
  it('posts one file with its description to the project, with the CSRF token and the cookie', async () => {
    const sent = uploadFile('kiln-logger', photo(), { altText: 'Bodge wire from D7', caption: 'Rev A' });
    const xhr = FakeXhr.last;
    expect(xhr.method).toBe('POST');
    expect(xhr.url).toBe('/api/projects/kiln-logger/uploads');
    expect(xhr.headers['X-CSRF-Token']).toBe('token-1');
    expect(xhr.withCredentials).toBe(true);
    expect(xhr.body!.get('altText')).toBe('Bodge wire from D7');
    expect(xhr.body!.get('caption')).toBe('Rev A');
    const file = xhr.body!.get('file') as File;
    expect(file.name).toBe('bodge wire.jpg');
    expect(file.size).toBe(2048);
    // The text fields come before the file, so the server has them when the file arrives.
    expect([...xhr.body!.keys()]).toEqual(['altText', 'caption', 'file']);

    xhr.respond(201, { items: [anUpload({ id: 31 })] });
    expect((await sent).id).toBe(31);
  });

  it('leaves out a description that was not given', () => {
    void uploadFile('kiln-logger', photo());
    expect([...FakeXhr.last.body!.keys()]).toEqual(['file']);
  });

  it('reports the share of the file sent', async () => {
    const seen: number[] = [];
    const sent = uploadFile('kiln-logger', photo(), { onProgress: (f) => seen.push(f) });
    FakeXhr.last.progress(512, 2048);
    FakeXhr.last.progress(2048, 2048);
    FakeXhr.last.respond(201, { items: [anUpload()] });
    await sent;
    expect(seen).toEqual([0.25, 1]);
  });

  it.each([
    [413, 'payload_too_large', 'This file is 30 MB; the limit is 20 MB per file.'],
    [413, 'payload_too_large', 'The project has used its 500 MB of storage.'],
    [415, 'unsupported_media_type', 'SVG images are not accepted: use PNG or WebP.'],
    [400, 'bad_request', 'This image is damaged and cannot be read.'],
  ])('turns a %i into an ApiError with the server’s message', async (status, code, message) => {
    const sent = uploadFile('kiln-logger', photo());
    FakeXhr.last.respond(status, refusal(code, message));
    const error = await sent.catch((e: unknown) => e);
    expect(error).toBeInstanceOf(ApiError);
    expect(error).toMatchObject({ status, code, message });
  });

  it('explains a 413 that came without the server’s wording (a proxy refused it)', async () => {
    const sent = uploadFile('kiln-logger', photo());
    FakeXhr.last.respond(413, '<html>Request Entity Too Large</html>', 'Payload Too Large');
    await expect(sent).rejects.toMatchObject({ status: 413, code: 'payload_too_large', message: 'This file is larger than the server accepts.' });
  });

  it('refreshes a stale CSRF token once and sends again', async () => {
    const sent = uploadFile('kiln-logger', photo());
    FakeXhr.last.respond(403, refusal('csrf_failed', 'stale token'));
    await vi.waitFor(() => expect(FakeXhr.all).toHaveLength(2));
    expect(refreshCsrf).toHaveBeenCalledTimes(1);
    expect(FakeXhr.last.headers['X-CSRF-Token']).toBe('token-2');
    FakeXhr.last.respond(201, { items: [anUpload({ id: 40 })] });
    expect((await sent).id).toBe(40);
  });

  it('does not retry a second CSRF refusal', async () => {
    const sent = uploadFile('kiln-logger', photo());
    FakeXhr.last.respond(403, refusal('csrf_failed', 'stale token'));
    await vi.waitFor(() => expect(FakeXhr.all).toHaveLength(2));
    FakeXhr.last.respond(403, refusal('csrf_failed', 'still stale'));
    await expect(sent).rejects.toMatchObject({ code: 'csrf_failed' });
    expect(FakeXhr.all).toHaveLength(2);
  });

  it('ends the session in one place on a 401', async () => {
    const sent = uploadFile('kiln-logger', photo());
    FakeXhr.last.respond(401, refusal('unauthenticated', 'Sign in first.'));
    await expect(sent).rejects.toMatchObject({ status: 401, code: 'unauthenticated' });
    expect(onUnauthenticated).toHaveBeenCalledTimes(1);
  });

  it('says the server could not be reached on a network failure', async () => {
    const sent = uploadFile('kiln-logger', photo());
    FakeXhr.last.failNetwork();
    await expect(sent).rejects.toMatchObject({ status: 0, code: 'network' });
  });

  it('aborts the request when the signal fires, and rejects with an AbortError', async () => {
    const controller = new AbortController();
    const sent = uploadFile('kiln-logger', photo(), { signal: controller.signal });
    controller.abort();
    expect(FakeXhr.last.aborted).toBe(true);
    await expect(sent).rejects.toMatchObject({ name: 'AbortError' });
  });

  it('sends nothing when the signal has fired already', async () => {
    const controller = new AbortController();
    controller.abort();
    await expect(uploadFile('kiln-logger', photo(), { signal: controller.signal })).rejects.toMatchObject({
      name: 'AbortError',
    });
    expect(FakeXhr.all).toHaveLength(0);
  });
});

describe('waitUntilReady', () => {
  it('polls the upload until it is ready', async () => {
    let polls = 0;
    fakeApi({
      'GET /api/uploads/12': () => {
        polls++;
        return { status: 200, body: anUpload({ state: polls < 3 ? 'processing' : 'ready', variants: [] }) };
      },
    });
    const ready = await waitUntilReady(12, { intervalMs: 1, maxIntervalMs: 2 });
    expect(ready.state).toBe('ready');
    expect(polls).toBe(3);
  });

  it('is done as soon as the variant the Markdown points at exists, before the larger ones', async () => {
    const processing = anUpload({ state: 'processing' }); // thumb and page made, full still missing
    const calls = fakeApi({});
    const usable = await waitUntilReady(12, { current: processing });
    expect(usable).toBe(processing);
    expect(calls.calls).toHaveLength(0);
  });

  it('rejects with the server’s reason when processing failed', async () => {
    fakeApi({
      'GET /api/uploads/12': json(anUpload({ state: 'failed', variants: [], failure: 'The file is not a JPEG after all.' })),
    });
    const error = await waitUntilReady(12, { intervalMs: 1 }).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(UploadProcessingError);
    expect((error as Error).message).toBe('The file is not a JPEG after all.');
  });

  it('stops when the signal fires', async () => {
    fakeApi({ 'GET /api/uploads/12': json(anUpload({ state: 'processing', variants: [] })) });
    const controller = new AbortController();
    const waiting = waitUntilReady(12, { intervalMs: 50, signal: controller.signal });
    await tick();
    controller.abort();
    await expect(waiting).rejects.toMatchObject({ name: 'AbortError' });
  });
});

describe('isUsable', () => {
  it('an attachment only when ready; a photo when its page-width variant exists', () => {
    expect(isUsable(anUpload({ kind: 'attachment', state: 'processing', variants: [], markdownUrl: '/api/uploads/12/original.pdf' }))).toBe(false);
    expect(isUsable(anUpload({ state: 'processing', variants: [] }))).toBe(false);
    expect(isUsable(anUpload({ state: 'processing' }))).toBe(true);
    expect(isUsable(anUpload({ state: 'failed' }))).toBe(false);
  });
});

describe('missingAltTextOf', () => {
  const images = [{ uploadId: 7, name: 'scope.png', thumbUrl: '/api/uploads/7/thumb.webp', usedIn: 'Hardware' }];

  it('reads the images out of a publish refused for missing alt text', () => {
    const error = new ApiError(400, 'validation_failed', 'Some photos have no alt text.', { images });
    expect(missingAltTextOf(error)).toEqual({ images });
  });

  it('is null for other validation errors and other failures', () => {
    expect(missingAltTextOf(new ApiError(400, 'validation_failed', 'x', { issues: [{ path: 'title', message: 'm' }] }))).toBeNull();
    expect(missingAltTextOf(new ApiError(409, 'conflict', 'x', { images }))).toBeNull();
    expect(missingAltTextOf(new Error('x'))).toBeNull();
  });
});

describe('formatBytes', () => {
  it('uses decimal units with one decimal below 100', () => {
    expect(formatBytes(999)).toBe('999 B');
    expect(formatBytes(1000)).toBe('1 kB');
    expect(formatBytes(840_000)).toBe('840 kB');
    expect(formatBytes(3_250_000)).toBe('3.3 MB');
    expect(formatBytes(20_000_000)).toBe('20 MB');
    expect(formatBytes(500_000_000)).toBe('500 MB');
  });
});

describe('useUploadQueue', () => {
  it('shows each file with its size and progress while it uploads, and drops it once ready', async () => {
    const queue = useUploadQueue();
    const item = queue.add('kiln-logger', photo());
    expect(queue.items.value.map((i) => [i.name, i.size, i.state, i.isImage])).toEqual([
      ['bodge wire.jpg', 2048, 'uploading', true],
    ]);
    expect(queue.busy.value).toBe(true);

    FakeXhr.last.progress(1024, 2048);
    expect(queue.items.value[0]!.fraction).toBe(0.5);

    FakeXhr.last.respond(201, { items: [anUpload({ id: 44 })] });
    expect((await item.done).id).toBe(44);
    expect(queue.items.value).toEqual([]);
    expect(queue.busy.value).toBe(false);
  });

  it('waits for the variants before calling a photo ready', async () => {
    fakeApi({ 'GET /api/uploads/45': json(anUpload({ id: 45, state: 'ready' })) });
    const queue = useUploadQueue();
    const item = queue.add('kiln-logger', photo());
    FakeXhr.last.respond(201, { items: [anUpload({ id: 45, state: 'processing', variants: [] })] });
    await vi.waitFor(() => expect(item.state).toBe('processing'));
    expect(queue.items.value).toHaveLength(1);
    expect((await item.done).state).toBe('ready');
  });

  it('keeps a failed file in the list with the server’s reason until dismissed', async () => {
    const queue = useUploadQueue();
    const item = queue.add('kiln-logger', new File(['<svg/>'], 'logo.svg', { type: 'image/svg+xml' }));
    expect(item.isImage).toBe(false);
    FakeXhr.last.respond(415, refusal('unsupported_media_type', 'SVG images are not accepted: use PNG or WebP.'));
    await expect(item.done).rejects.toBeInstanceOf(ApiError);
    expect(queue.items.value.map((i) => [i.state, i.error])).toEqual([['failed', 'SVG images are not accepted: use PNG or WebP.']]);
    expect(queue.busy.value).toBe(false);
    queue.dismiss(item.key);
    expect(queue.items.value).toEqual([]);
  });

  it('cancel aborts the request and drops the file at once', async () => {
    const queue = useUploadQueue();
    const first = queue.add('kiln-logger', photo());
    const xhr = FakeXhr.last;
    queue.add('kiln-logger', new File(['x'], 'bom.csv', { type: 'text/csv' }));
    first.cancel();
    expect(xhr.aborted).toBe(true);
    expect(queue.items.value.map((i) => i.name)).toEqual(['bom.csv']);
    await expect(first.done).rejects.toMatchObject({ name: 'AbortError' });
    expect(queue.count.value).toBe(1);
  });

  it('settles once every file has finished, whatever the outcome', async () => {
    const queue = useUploadQueue();
    queue.add('kiln-logger', photo());
    const [a] = FakeXhr.all;
    queue.add('kiln-logger', photo());
    const [, b] = FakeXhr.all;
    let settled = false;
    void queue.settled().then(() => (settled = true));
    a!.respond(201, { items: [anUpload({ id: 1 })] });
    await tick();
    expect(settled).toBe(false);
    b!.respond(413, refusal('payload_too_large', 'Too large.'));
    await vi.waitFor(() => expect(settled).toBe(true));
  });

  it('keeps finished files when asked', async () => {
    const queue = useUploadQueue({ keepFinished: true });
    const item = queue.add('kiln-logger', photo());
    FakeXhr.last.respond(201, { items: [anUpload()] });
    await item.done;
    expect(queue.items.value.map((i) => i.state)).toEqual(['ready']);
  });

  it('cancels what is still running when its page goes away', () => {
    const scope = effectScope();
    const queue = scope.run(() => useUploadQueue())!;
    queue.add('kiln-logger', photo());
    const xhr = FakeXhr.last;
    scope.stop();
    expect(xhr.aborted).toBe(true);
    expect(queue.items.value).toEqual([]);
  });
});
