/**
 * A stand-in for XMLHttpRequest in client tests: records what the upload client sends and lets
 * the test drive progress, the answer, a network failure or nothing at all.
 */
import { vi } from 'vitest';

export class FakeXhr {
  static all: FakeXhr[] = [];
  static get last(): FakeXhr {
    const last = FakeXhr.all.at(-1);
    if (!last) throw new Error('no request was made');
    return last;
  }

  method = '';
  url = '';
  headers: Record<string, string> = {};
  body: FormData | null = null;
  withCredentials = false;
  aborted = false;
  status = 0;
  statusText = '';
  responseText = '';
  upload: { onprogress: ((event: ProgressEvent) => void) | null } = { onprogress: null };
  onload: (() => void) | null = null;
  onerror: (() => void) | null = null;
  ontimeout: (() => void) | null = null;
  onabort: (() => void) | null = null;

  constructor() {
    FakeXhr.all.push(this);
  }

  open(method: string, url: string) {
    this.method = method;
    this.url = url;
  }

  setRequestHeader(name: string, value: string) {
    this.headers[name] = value;
  }

  send(body: FormData) {
    this.body = body;
  }

  abort() {
    this.aborted = true;
    this.onabort?.();
  }

  // --- driven by the test ---

  progress(loaded: number, total: number) {
    this.upload.onprogress?.({ lengthComputable: true, loaded, total } as ProgressEvent);
  }

  respond(status: number, body?: unknown, statusText = '') {
    this.status = status;
    this.statusText = statusText;
    this.responseText = body === undefined ? '' : typeof body === 'string' ? body : JSON.stringify(body);
    this.onload?.();
  }

  failNetwork() {
    this.onerror?.();
  }
}

export function installFakeXhr() {
  FakeXhr.all = [];
  vi.stubGlobal('XMLHttpRequest', FakeXhr);
}

/** Lets promise callbacks run. */
export const tick = () => new Promise((resolve) => setTimeout(resolve, 0));
