/**
 * The unsubscribe page and the development outbox, over the one HTTP client. The shapes
 * mirror the server's contracts in api/mail/contracts.ts.
 */
import type { NotificationKind } from '@shared/contracts/errata';
import type { MeResponse } from '@shared/contracts/users';
import type { NotificationMode } from '@shared/domain';
import { ref, type Ref } from 'vue';
import { http } from './http';

/** One kind, or every kind delivered in the daily digest. */
export type UnsubscribeScope = NotificationKind | 'daily_digest';

export interface UnsubscribeState {
  kind: UnsubscribeScope;
  mode: NotificationMode;
}

export interface OutboxSummary {
  id: string;
  to: string;
  subject: string;
  receivedAt: string;
}

export interface OutboxMessage extends OutboxSummary {
  from: string;
  headers: { name: string; value: string }[];
  text: string;
  html: string | null;
}

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

const devOutbox = ref(false);
let asked = false;

/**
 * Whether this server runs the development outbox (from `GET /api/me`), asked once per page
 * load. Only decides whether a menu shows a link: if the question fails, the link stays hidden.
 */
export function useDevOutboxAvailable(): Readonly<Ref<boolean>> {
  if (!asked) {
    asked = true;
    http.get<MeResponse>('/me').then(
      (me) => (devOutbox.value = me.devOutbox),
      () => (devOutbox.value = false),
    );
  }
  return devOutbox;
}
