/**
 * One notifier for unexpected errors. Unhandled errors from components, router navigation
 * and stray promises all end here and become a message, instead of `catch + console.error`
 * scattered through the UI.
 */
import type { App } from 'vue';
import type { Router } from 'vue-router';
import { useNotifierStore } from '@/stores/notifier';
import { ApiError } from './http';

export function describeError(error: unknown): string {
  if (error instanceof ApiError) return error.message;
  if (error instanceof Error && error.message) return `Something went wrong: ${error.message}`;
  return 'Something went wrong.';
}

export function reportUnexpected(error: unknown) {
  if ((error as Error)?.name === 'AbortError') return;
  useNotifierStore().push(describeError(error), 'error');
  // Keep the full error for whoever opens the console; the reader sees the sentence above.
  console.warn('[reworkbook]', error);
}

export function useNotifier() {
  const store = useNotifierStore();
  return {
    info: (text: string) => store.push(text, 'info'),
    success: (text: string) => store.push(text, 'success'),
    warning: (text: string) => store.push(text, 'warning'),
    error: (text: string) => store.push(text, 'error'),
    unexpected: reportUnexpected,
  };
}

export function installErrorRouting(app: App, router: Router) {
  app.config.errorHandler = (error) => reportUnexpected(error);
  router.onError((error) => reportUnexpected(error));
  window.addEventListener('unhandledrejection', (event) => {
    event.preventDefault();
    reportUnexpected(event.reason);
  });
}
