/**
 * Asks before unsaved changes are left behind: the browser's own prompt when the tab closes or
 * reloads, and a confirmation when a link inside the app leads away (or to another document on
 * the same page). The wording says what really happens: the changes stay as a draft.
 */
import { onBeforeUnmount, onMounted } from 'vue';
import { onBeforeRouteLeave, onBeforeRouteUpdate } from 'vue-router';

export const LEAVE_MESSAGE = 'Leave without saving? Your changes stay as a draft in this browser.';

export interface LeaveGuardOptions {
  /** How to ask; `window.confirm` unless said (a page may pass a dialog of its own). */
  confirm?: (message: string) => boolean | Promise<boolean>;
  message?: string;
}

export function useLeaveGuard(isDirty: () => boolean, options: LeaveGuardOptions = {}) {
  const message = options.message ?? LEAVE_MESSAGE;
  const ask = options.confirm ?? ((text: string) => window.confirm(text));
  let allowOnce = false;

  function onBeforeUnload(event: BeforeUnloadEvent) {
    if (!isDirty()) return;
    // Browsers show their own sentence; both calls are needed across browsers to get the prompt.
    event.preventDefault();
    event.returnValue = '';
  }

  async function guard(): Promise<boolean> {
    if (allowOnce) {
      allowOnce = false;
      return true;
    }
    if (!isDirty()) return true;
    return await ask(message);
  }

  onMounted(() => window.addEventListener('beforeunload', onBeforeUnload));
  onBeforeUnmount(() => window.removeEventListener('beforeunload', onBeforeUnload));
  onBeforeRouteLeave(guard);
  // Same page, other document (new params); a query or hash change keeps the document open.
  onBeforeRouteUpdate((to, from) => (to.path === from.path ? true : guard()));

  return {
    /** Lets the next navigation through without asking (e.g. to the saved document after a save). */
    allowNextLeave() {
      allowOnce = true;
    },
  };
}
