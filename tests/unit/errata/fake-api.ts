/**
 * A stand-in for the API in component tests: answers by "METHOD /api/path" (query ignored) and
 * records what was sent. Anything unanswered gets the API's 404 wire shape.
 */
import { flushPromises } from '@vue/test-utils';
import { vi } from 'vitest';

export interface Call {
  method: string;
  url: string;
  body: unknown;
}

export type Answer = (call: Call) => { status: number; body?: unknown };

export const json =
  (body: unknown, status = 200): Answer =>
  () => ({ status, body });

export function fakeApi(answers: Record<string, Answer>) {
  const calls: Call[] = [];
  vi.stubGlobal(
    'fetch',
    vi.fn(async (url: string, init: RequestInit) => {
      const call = { method: init.method ?? 'GET', url, body: init.body ? JSON.parse(String(init.body)) : undefined };
      calls.push(call);
      const answer = answers[`${call.method} ${url.split('?')[0]}`]?.(call) ?? {
        status: 404,
        body: { error: { code: 'not_found', message: 'no such thing' } },
      };
      return new Response(answer.status === 204 ? null : JSON.stringify(answer.body), {
        status: answer.status,
        headers: { 'Content-Type': 'application/json' },
      });
    }),
  );
  return { calls, writes: () => calls.filter((c) => c.method !== 'GET') };
}

/** Lets pending requests, renders and navigations finish (a navigation settles a few ticks later). */
export async function settle() {
  await flushPromises();
  await new Promise((resolve) => setTimeout(resolve, 0));
  await flushPromises();
}
