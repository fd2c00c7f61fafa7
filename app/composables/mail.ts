/** The unsubscribe page and the development outbox, over the one HTTP client. */
import type { OutboxMessage, OutboxSummary, UnsubscribeState } from '@shared/contracts/mail';
import { computed, type Ref } from 'vue';
import { useSessionStore } from '@/stores/session';
import { http } from './http';

export type { OutboxMessage, OutboxSummary, UnsubscribeState };

export function useUnsubscribe() {
  return {
    /** What the link turns off; changes nothing. */
    describe: (token: string) => http.get<UnsubscribeState>('/unsubscribe', { query: { token } }),
    confirm: (token: string) => http.post<UnsubscribeState>('/unsubscribe', undefined, { query: { token } }),
  };
}

export function useDevOutbox() {
  return {
    list: () => http.get<{ items: OutboxSummary[] }>('/dev/outbox'),
    message: (id: string) => http.get<OutboxMessage>(`/dev/outbox/${encodeURIComponent(id)}`),
  };
}

/** Whether this server runs the development outbox (from the session's `GET /api/me`). */
export function useDevOutboxAvailable(): Readonly<Ref<boolean>> {
  const session = useSessionStore();
  return computed(() => session.devOutbox);
}
