/**
 * Notifications, their delivery settings and project follows: typed calls, our own sentence for
 * each notification, and the one feed the bell and the notifications page share (so marking one
 * read on the page lowers the count on the bell at once), with the bell's polling.
 */
import type { Notification, NotificationKind, NotificationList, NotificationSettings } from '@shared/contracts/errata';
import type { NotificationMode } from '@shared/domain';
import { computed, getCurrentInstance, onBeforeUnmount, onMounted, ref, watch } from 'vue';
import { ApiError, http } from './http';
import { reportUnexpected } from './notifier';

export const notificationsApi = {
  list: () => http.get<NotificationList>('/me/notifications'),
  markRead: (ids: number[]) => http.post<NotificationList>('/me/notifications/read', { ids }),
  markAllRead: () => http.post<NotificationList>('/me/notifications/read', { all: true }),
  settings: () => http.get<NotificationSettings>('/me/notification-settings'),
  saveSettings: (modes: Partial<Record<NotificationKind, NotificationMode>>) =>
    http.put<NotificationSettings>('/me/notification-settings', { modes }),
};

const f = (slug: string) => `/projects/${encodeURIComponent(slug)}/follow`;

export const followApi = {
  get: (slug: string) => http.get<{ following: boolean }>(f(slug)),
  follow: (slug: string) => http.put<{ following: boolean }>(f(slug)),
  unfollow: (slug: string) => http.delete<{ following: boolean }>(f(slug)),
};

export const notificationModeLabels: Record<NotificationMode, string> = {
  immediate: 'Immediately',
  daily: 'Daily digest',
  off: 'Off',
};

// --- Wording ------------------------------------------------------------------------------------

function actorName(n: Notification): string {
  const { actor } = n.payload;
  return actor.displayName.trim() || `@${actor.handle}`;
}

/** The server labels a new erratum without a number yet "New erratum: <title>"; the sentences say that their own way. */
function proposedErratumTitle(label: string | undefined): string {
  return (label ?? '').replace(/^New erratum:\s*/, '').trim();
}

/** "your proposed edit to Hardware", "your proposed erratum Vent stays open after a power cut". */
function yourProposal(n: Notification): string {
  const { proposalKind, targetLabel } = n.payload;
  if (proposalKind === 'new_erratum') {
    const title = proposedErratumTitle(targetLabel);
    return title ? `your proposed erratum ${title}` : 'your proposed erratum';
  }
  return targetLabel ? `your proposed edit to ${targetLabel}` : 'your proposal';
}

function erratumName(n: Notification): string | null {
  const { erratumNumber, erratumTitle } = n.payload;
  if (erratumNumber === undefined) return null;
  return erratumTitle ? `E${erratumNumber} ${erratumTitle}` : `E${erratumNumber}`;
}

/**
 * One short sentence saying what happened, from the notification's kind and payload, e.g.
 * "Bram Tolliver proposed a new erratum on Greenhouse vent controller".
 */
export function notificationSentence(n: Notification): string {
  const who = actorName(n);
  const project = n.payload.projectTitle;
  switch (n.kind) {
    case 'proposal_received': {
      const { proposalKind, targetLabel } = n.payload;
      if (proposalKind === 'new_erratum') return `${who} proposed a new erratum on ${project}`;
      if (targetLabel) return `${who} proposed an edit to ${targetLabel} on ${project}`;
      return `${who} sent a proposal on ${project}`;
    }
    case 'proposal_decided': {
      const { decision } = n.payload;
      if (decision === 'accepted') return `${who} accepted ${yourProposal(n)} on ${project}`;
      if (decision === 'declined') return `${who} declined ${yourProposal(n)} on ${project}`;
      return `${who} decided on ${yourProposal(n)} on ${project}`;
    }
    case 'comment': {
      const { proposalId, proposalKind, targetLabel } = n.payload;
      if (proposalId !== undefined) {
        if (proposalKind === 'new_erratum') {
          const title = proposedErratumTitle(targetLabel);
          return title
            ? `${who} commented on the proposed erratum ${title} on ${project}`
            : `${who} commented on a proposed erratum on ${project}`;
        }
        return targetLabel
          ? `${who} commented on the proposal for ${targetLabel} on ${project}`
          : `${who} commented on a proposal on ${project}`;
      }
      const erratum = erratumName(n);
      if (erratum) return `${who} commented on ${erratum} on ${project}`;
      return `${who} commented on ${project}`;
    }
    case 'new_erratum': {
      const erratum = erratumName(n);
      return erratum
        ? `${who} recorded a new erratum on ${project}: ${erratum}`
        : `${who} recorded a new erratum on ${project}`;
    }
  }
}

/** A second line where the payload has more to say: a decline's reason, a comment's opening. */
export function notificationDetail(n: Notification): string | null {
  if (n.kind === 'proposal_decided' && n.payload.decision === 'declined' && n.payload.reason) {
    return `Reason: ${n.payload.reason}`;
  }
  if (n.kind === 'comment' && n.payload.excerpt) return n.payload.excerpt;
  return null;
}

/**
 * The app-relative path a notification opens, or null when the payload holds something else
 * (an absolute or protocol-relative address would lead out of the app).
 */
export function notificationPath(n: Notification): string | null {
  const path = n.payload.path;
  return path.startsWith('/') && !path.startsWith('//') && !path.startsWith('/\\') ? path : null;
}

/** Unread first, newest first within each group. */
export function unreadFirst(items: readonly Notification[]): Notification[] {
  return [...items].sort((a, b) => Number(a.read) - Number(b.read) || b.createdAt.localeCompare(a.createdAt));
}

// --- The shared feed ----------------------------------------------------------------------------

const feed = ref<NotificationList | null>(null);
let inflight: Promise<void> | null = null;
/** Set after a failed background refresh was reported, so an offline tab says so once, not every minute. */
let failureReported = false;

async function refresh(options: { quiet?: boolean } = {}): Promise<void> {
  inflight ??= (async () => {
    try {
      feed.value = await notificationsApi.list();
      failureReported = false;
    } catch (error) {
      // Signed out meanwhile: the session store has noticed, and the bell goes away.
      if (error instanceof ApiError && error.code === 'unauthenticated') {
        feed.value = null;
        return;
      }
      if (!options.quiet) throw error;
      if (!failureReported) reportUnexpected(error);
      failureReported = true;
    } finally {
      inflight = null;
    }
  })();
  return inflight;
}

/** The signed-in member's notifications, shared by every component that shows them. */
export function useNotifications() {
  const items = computed(() => feed.value?.items ?? []);
  const unreadCount = computed(() => feed.value?.unreadCount ?? 0);
  return {
    feed,
    items,
    unreadCount,
    loaded: computed(() => feed.value !== null),
    refresh,
    async markRead(ids: number[]) {
      if (ids.length === 0) return;
      feed.value = await notificationsApi.markRead(ids);
    },
    async markAllRead() {
      feed.value = await notificationsApi.markAllRead();
    },
    /** Forgets the feed (after sign-out). */
    clear() {
      feed.value = null;
    },
  };
}

export interface NotificationPollingOptions {
  /** Poll only while this holds (signed in). */
  enabled: () => boolean;
  /** Refreshes whenever this value changes, e.g. the route's full path. */
  refreshOn?: () => unknown;
  /** 60 s unless said. */
  intervalMs?: number;
}

/**
 * Keeps the feed fresh for the bell: one refresh at start, then every minute while the tab is
 * visible; a tab coming back into view refreshes at once. Stops with the component.
 */
export function useNotificationPolling(options: NotificationPollingOptions) {
  const interval = options.intervalMs ?? 60_000;
  const notifications = useNotifications();
  let timer: ReturnType<typeof setInterval> | undefined;

  const visible = () => typeof document === 'undefined' || document.visibilityState !== 'hidden';

  function stopTimer() {
    clearInterval(timer);
    timer = undefined;
  }

  function sync() {
    stopTimer();
    if (!options.enabled()) {
      notifications.clear();
      return;
    }
    if (!visible()) return;
    void refresh({ quiet: true });
    timer = setInterval(() => {
      if (options.enabled() && visible()) void refresh({ quiet: true });
    }, interval);
  }

  const onVisibility = () => sync();

  function start() {
    document.addEventListener('visibilitychange', onVisibility);
    sync();
  }
  function stop() {
    stopTimer();
    document.removeEventListener('visibilitychange', onVisibility);
  }

  watch(() => options.enabled(), sync);
  if (options.refreshOn) {
    watch(options.refreshOn, () => {
      if (options.enabled() && visible()) void refresh({ quiet: true });
    });
  }
  if (getCurrentInstance()) {
    onMounted(start);
    onBeforeUnmount(stop);
  } else {
    start();
  }
  return { stop };
}
