/**
 * The one HTTP client. Components never call fetch: they use typed composables built on
 * this. It sends the CSRF token on unsafe methods, parses the error wire shape into ApiError,
 * refreshes the token once when the server says it is stale, and treats 401 in one place.
 */
import type { ErrorCode } from '@shared/errors';
import { isErrorBody } from '@shared/errors';

export class ApiError extends Error {
  override name = 'ApiError';
  constructor(
    readonly status: number,
    readonly code: ErrorCode | 'network',
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
  }
}

type Method = 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';

export interface RequestOptions {
  body?: unknown;
  query?: Record<string, string | number | boolean | undefined | null>;
  headers?: Record<string, string>;
  signal?: AbortSignal;
}

interface HttpHooks {
  csrfToken(): string | null;
  refreshCsrf(): Promise<void>;
  onUnauthenticated(): void;
}

let hooks: HttpHooks = {
  csrfToken: () => null,
  refreshCsrf: async () => {},
  onUnauthenticated: () => {},
};

/** The session store plugs itself in here (avoids a circular import). */
export function configureHttp(next: HttpHooks) {
  hooks = next;
}

function buildUrl(path: string, query?: RequestOptions['query']): string {
  const url = new URL(`/api${path}`, window.location.origin);
  for (const [key, value] of Object.entries(query ?? {})) {
    if (value !== undefined && value !== null && value !== '') url.searchParams.set(key, String(value));
  }
  return url.pathname + url.search;
}

async function send<T>(method: Method, path: string, options: RequestOptions, retried: boolean): Promise<T> {
  const headers: Record<string, string> = { Accept: 'application/json', ...options.headers };
  if (options.body !== undefined) headers['Content-Type'] = 'application/json';
  if (method !== 'GET') {
    const token = hooks.csrfToken();
    if (token) headers['X-CSRF-Token'] = token;
  }
  let response: Response;
  try {
    response = await fetch(buildUrl(path, options.query), {
      method,
      headers,
      credentials: 'same-origin',
      body: options.body === undefined ? null : JSON.stringify(options.body),
      signal: options.signal ?? null,
    });
  } catch (error) {
    if ((error as Error).name === 'AbortError') throw error;
    throw networkError();
  }
  if (response.status === 204) return undefined as T;
  const text = await response.text();
  let data: unknown = undefined;
  if (text) {
    try {
      data = JSON.parse(text);
    } catch {
      data = undefined;
    }
  }
  if (response.ok) return data as T;
  if (isErrorBody(data) && data.error.code === 'csrf_failed' && !retried) {
    await hooks.refreshCsrf();
    return send<T>(method, path, options, true);
  }
  throw errorFromResponse(response.status, response.statusText, data);
}

function networkError(): ApiError {
  return new ApiError(0, 'network', 'Reworkbook could not reach the server. Check your connection and try again.');
}

/** The ApiError for a failed answer (its parsed JSON body, if any); a 401 ends the session here. */
function errorFromResponse(status: number, statusText: string, data: unknown): ApiError {
  if (isErrorBody(data)) {
    const { code, message, details } = data.error;
    if (code === 'unauthenticated') hooks.onUnauthenticated();
    return new ApiError(status, code, message, details);
  }
  return new ApiError(status, 'internal', `The server answered ${status} ${statusText}.`);
}

/**
 * For the one request fetch cannot make: uploads with progress go through XMLHttpRequest
 * (composables/uploads.ts), and reuse the token, the stale-token refresh and the error parsing here.
 */
export const httpTransport = {
  csrfToken: () => hooks.csrfToken(),
  refreshCsrf: () => hooks.refreshCsrf(),
  networkError,
  errorFromResponse,
};

export const http = {
  get: <T>(path: string, options: RequestOptions = {}) => send<T>('GET', path, options, false),
  post: <T>(path: string, body?: unknown, options: RequestOptions = {}) => send<T>('POST', path, { ...options, body }, false),
  put: <T>(path: string, body?: unknown, options: RequestOptions = {}) => send<T>('PUT', path, { ...options, body }, false),
  patch: <T>(path: string, body?: unknown, options: RequestOptions = {}) => send<T>('PATCH', path, { ...options, body }, false),
  delete: <T>(path: string, options: RequestOptions = {}) => send<T>('DELETE', path, options, false),
};

/** Error codes a page shows itself (form errors, 403/404 states); anything else goes to the notifier. */
export const EXPECTED_CODES: ReadonlySet<string> = new Set([
  'validation_failed',
  'forbidden',
  'not_found',
  'conflict',
  'edit_conflict',
  'unauthenticated',
  'precondition_required',
  'gone',
]);
