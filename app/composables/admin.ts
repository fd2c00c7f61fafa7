import type { AdminUser, AdminUserList, ChangeRole, Suspend } from '@shared/contracts/users';
import type { SiteRole } from '@shared/domain';
import { ref } from 'vue';
import { http } from './http';

/** Members and roles for the admin page. */
export function useAdminUsers() {
  const list = ref<AdminUserList | null>(null);
  const loading = ref(false);

  async function load(filter: { q?: string; role?: SiteRole | null; page?: number } = {}) {
    loading.value = true;
    try {
      list.value = await http.get<AdminUserList>('/admin/users', {
        query: { q: filter.q, role: filter.role ?? undefined, page: filter.page ?? 1 },
      });
    } finally {
      loading.value = false;
    }
  }

  function replace(updated: AdminUser) {
    if (!list.value) return;
    list.value.items = list.value.items.map((u) => (u.id === updated.id ? updated : u));
  }

  async function changeRole(handle: string, role: SiteRole) {
    const body: ChangeRole = { role };
    replace(await http.put<AdminUser>(`/admin/users/${encodeURIComponent(handle)}/role`, body));
  }

  async function setSuspended(handle: string, suspended: boolean, reason = '') {
    const body: Suspend = { suspended, reason };
    replace(await http.put<AdminUser>(`/admin/users/${encodeURIComponent(handle)}/suspension`, body));
  }

  return { list, loading, load, changeRole, setSuspended };
}
