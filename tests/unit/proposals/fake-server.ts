/**
 * A fake API for component tests: answers by "METHOD /api/path" and records every request, so
 * a test can check what the page sent. Unknown requests get the API's 404 wire shape.
 */
import { vi } from 'vitest';

export interface Call {
  method: string;
  url: string;
  body: unknown;
}

export interface Answer {
  status: number;
  body: unknown;
}

export type Handler = (call: Call) => Answer;

export const ok =
  (body: unknown, status = 200): Handler =>
  () => ({ status, body });

export const fail =
  (status: number, code: string, message: string, details?: unknown): Handler =>
  () => ({ status, body: { error: { code, message, details } } });

export function fakeServer(answers: Record<string, Handler>) {
  const calls: Call[] = [];
  vi.stubGlobal(
    'fetch',
    vi.fn(async (url: string, init: RequestInit) => {
      const call = { method: init.method ?? 'GET', url, body: init.body ? JSON.parse(String(init.body)) : undefined };
      calls.push(call);
      const answer = answers[`${call.method} ${url}`];
      const { status, body } = answer
        ? answer(call)
        : { status: 404, body: { error: { code: 'not_found', message: `No ${call.method} ${url}` } } };
      return new Response(JSON.stringify(body), { status, headers: { 'Content-Type': 'application/json' } });
    }),
  );
  return {
    calls,
    /** Requests other than GET, as "METHOD url". */
    writes: () => calls.filter((c) => c.method !== 'GET'),
    /** Changes or adds an answer while the test runs. */
    answer(key: string, handler: Handler) {
      answers[key] = handler;
    },
  };
}

export const people = {
  maker: { id: 1, handle: 'odile-fenn', displayName: 'Odile Fenn', avatarUrl: null },
  contributor: { id: 2, handle: 'bram-tolliver', displayName: 'Bram Tolliver', avatarUrl: null },
  editor: { id: 3, handle: 'wren-okafor', displayName: 'Wren Okafor', avatarUrl: null },
};

export function signedInAs(user: (typeof people)[keyof typeof people]) {
  return { ...user, email: `${user.handle}@example.org`, role: 'member' as const };
}
