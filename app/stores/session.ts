/**
 * The signed-in member and the CSRF token: the client's view of the session. Loaded once at
 * start, refreshed after sign-in/out and whenever the server says the session ended.
 */
import type { CurrentUser, MeResponse } from '@shared/contracts/users';
import { defineStore } from 'pinia';
import { computed, ref } from 'vue';
import { configureHttp, http } from '@/composables/http';
import type { Requirement } from '@/router/routes';

export const useSessionStore = defineStore('session', () => {
  const user = ref<CurrentUser | null>(null);
  const csrfToken = ref<string | null>(null);
  const provider = ref<MeResponse['signInProvider']>('github');
  const loaded = ref(false);
  /** The development outbox exists on this server (local SMTP capture). */
  const devOutbox = ref(false);
  let loading: Promise<void> | null = null;

  async function refresh() {
    const me = await http.get<MeResponse>('/me');
    user.value = me.user;
    csrfToken.value = me.csrfToken;
    provider.value = me.signInProvider;
    devOutbox.value = me.devOutbox;
    loaded.value = true;
  }

  function ensureLoaded(): Promise<void> {
    if (loaded.value) return Promise.resolve();
    loading ??= refresh().finally(() => {
      loading = null;
    });
    return loading;
  }

  /** Full-page navigation: the OAuth flow leaves the app and comes back to returnTo. */
  function signIn(returnTo = window.location.pathname + window.location.search) {
    const url = new URL('/api/auth/github', window.location.origin);
    if (returnTo.startsWith('/') && !returnTo.startsWith('/sign-in')) url.searchParams.set('returnTo', returnTo);
    window.location.assign(url.toString());
  }

  async function signOut() {
    await http.post('/auth/signout');
    user.value = null;
    csrfToken.value = null;
  }

  const isSignedIn = computed(() => user.value !== null);

  function satisfies(requirement: Requirement | undefined): 'ok' | 'sign-in' | 'forbidden' {
    if (!requirement) return 'ok';
    if (!user.value) return 'sign-in';
    if (requirement === 'signed-in') return 'ok';
    if (requirement === 'moderator') return user.value.role === 'moderator' || user.value.role === 'admin' ? 'ok' : 'forbidden';
    return user.value.role === 'admin' ? 'ok' : 'forbidden';
  }

  configureHttp({
    csrfToken: () => csrfToken.value,
    refreshCsrf: refresh,
    onUnauthenticated: () => {
      user.value = null;
      csrfToken.value = null;
    },
  });

  return { user, csrfToken, provider, devOutbox, loaded, isSignedIn, refresh, ensureLoaded, signIn, signOut, satisfies };
});
