// @vitest-environment happy-dom
/**
 * Results as you type: one request once the reader pauses, and a request the reader has typed
 * past is aborted and never reports, neither its answer nor its abort.
 */
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { latestRequest, searchApi } from '@/composables/search';

interface Call {
  args: string;
  signal: AbortSignal;
  resolve(value: string): void;
  reject(error: unknown): void;
}

function fakeRequest() {
  const calls: Call[] = [];
  const request = (args: string, signal: AbortSignal) =>
    new Promise<string>((resolve, reject) => {
      calls.push({ args, signal, resolve, reject });
    });
  return { calls, request };
}

const abortError = () => new DOMException('The operation was aborted.', 'AbortError');

beforeEach(() => {
  setActivePinia(createPinia());
  vi.useFakeTimers();
});
afterEach(() => {
  vi.useRealTimers();
  vi.unstubAllGlobals();
  vi.restoreAllMocks();
});

describe('latestRequest', () => {
  it('waits for a pause of about 200 ms and then asks once, for what was typed last', () => {
    const { calls, request } = fakeRequest();
    const typing = latestRequest(request, { onResult: vi.fn() });
    typing.schedule('r');
    vi.advanceTimersByTime(120);
    typing.schedule('re');
    vi.advanceTimersByTime(120);
    typing.schedule('reg');
    vi.advanceTimersByTime(199);
    expect(calls).toEqual([]);
    vi.advanceTimersByTime(1);
    expect(calls.map((c) => c.args)).toEqual(['reg']);
  });

  it('aborts a request under way as soon as the reader types on', () => {
    const { calls, request } = fakeRequest();
    const typing = latestRequest(request, { onResult: vi.fn() });
    typing.schedule('regulator');
    vi.advanceTimersByTime(200);
    expect(calls[0]!.signal.aborted).toBe(false);
    typing.schedule('regulator hot');
    expect(calls[0]!.signal.aborted).toBe(true);
    vi.advanceTimersByTime(200);
    expect(calls.map((c) => c.args)).toEqual(['regulator', 'regulator hot']);
    expect(calls[1]!.signal.aborted).toBe(false);
  });

  it('never reports a superseded answer, even one that arrives after the newer one', async () => {
    const { calls, request } = fakeRequest();
    const onResult = vi.fn();
    const typing = latestRequest(request, { onResult });
    typing.run('GPIO3');
    typing.run('GPIO35');
    calls[1]!.resolve('answer for GPIO35');
    await vi.runAllTimersAsync();
    // A server that ignored the abort answers late.
    calls[0]!.resolve('answer for GPIO3');
    await vi.runAllTimersAsync();
    expect(onResult.mock.calls).toEqual([['answer for GPIO35', 'GPIO35']]);
  });

  it('keeps the abort of a superseded request quiet: no error handler, no console', async () => {
    const { calls, request } = fakeRequest();
    const onError = vi.fn();
    const warn = vi.spyOn(console, 'warn');
    const error = vi.spyOn(console, 'error');
    const typing = latestRequest(request, { onResult: vi.fn(), onError });
    typing.run('relay');
    typing.run('relay -mains');
    calls[0]!.reject(abortError());
    calls[1]!.resolve('ok');
    await vi.runAllTimersAsync();
    expect(onError).not.toHaveBeenCalled();
    expect(warn).not.toHaveBeenCalled();
    expect(error).not.toHaveBeenCalled();
  });

  it('reports a real failure of the newest request', async () => {
    const { calls, request } = fakeRequest();
    const onError = vi.fn();
    const onSettled = vi.fn();
    const typing = latestRequest(request, { onResult: vi.fn(), onError, onSettled });
    typing.run('pin');
    const failure = new Error('boom');
    calls[0]!.reject(failure);
    await vi.runAllTimersAsync();
    expect(onError).toHaveBeenCalledWith(failure, 'pin');
    expect(onSettled).toHaveBeenCalledTimes(1);
  });

  it('cancel drops a request that is still waiting for the pause', () => {
    const { calls, request } = fakeRequest();
    const onSettled = vi.fn();
    const typing = latestRequest(request, { onResult: vi.fn(), onSettled });
    typing.schedule('boot loop');
    typing.cancel();
    vi.advanceTimersByTime(1000);
    expect(calls).toEqual([]);
    expect(onSettled).toHaveBeenCalledTimes(1);
  });
});

describe('searchApi.search with latestRequest', () => {
  it('aborts the superseded fetch itself and shows nothing for it', async () => {
    const fetches: { url: string; signal: AbortSignal }[] = [];
    vi.stubGlobal(
      'fetch',
      vi.fn((url: string, init: RequestInit) => {
        const signal = init.signal!;
        fetches.push({ url, signal });
        return new Promise<Response>((resolve, reject) => {
          signal.addEventListener('abort', () => reject(abortError()));
          if (url.includes('q=GPIO35&')) {
            resolve(new Response(JSON.stringify({ items: [], query: 'GPIO35' }), { status: 200 }));
          }
        });
      }),
    );
    const warn = vi.spyOn(console, 'warn');
    const onResult = vi.fn();
    const onError = vi.fn();
    const typing = latestRequest((q: string, signal) => searchApi.search({ q, pageSize: 8 }, { signal }), {
      onResult,
      onError,
    });
    typing.schedule('GPIO3');
    vi.advanceTimersByTime(200);
    typing.schedule('GPIO35');
    vi.advanceTimersByTime(200);
    await vi.runAllTimersAsync();

    expect(fetches.map((f) => f.url)).toEqual(['/api/search?q=GPIO3&pageSize=8', '/api/search?q=GPIO35&pageSize=8']);
    expect(fetches[0]!.signal.aborted).toBe(true);
    expect(onResult.mock.calls).toEqual([[{ items: [], query: 'GPIO35' }, 'GPIO35']]);
    expect(onError).not.toHaveBeenCalled();
    expect(warn).not.toHaveBeenCalled();
  });
});
