/** The parts library routes (shared/contracts/checks.ts), through the one HTTP client. */
import type { PartCreate, PartList, PartPage, PartRevisionList, PartUpdate } from '@shared/contracts/checks';
import type { PartProfile } from '@shared/contracts/parts';
import { http } from '@/composables/http';

const one = (slug: string) => `/parts/${encodeURIComponent(slug)}`;

export const partsApi = {
  list: () => http.get<PartList>('/parts'),
  get: (slug: string) => http.get<PartPage>(one(slug)),
  revisions: (slug: string) => http.get<PartRevisionList>(`${one(slug)}/revisions`),
  create: (body: PartCreate) => http.post<PartPage>('/parts', body),
  update: (slug: string, body: PartUpdate) => http.put<PartPage>(one(slug), body),
};

/** Part pages fetched once per page visit: several pin maps or builds often share a part. */
export function usePartProfiles() {
  const cache = new Map<string, Promise<PartPage>>();
  return {
    page(partSlug: string): Promise<PartPage> {
      let found = cache.get(partSlug);
      if (!found) {
        found = partsApi.get(partSlug);
        // A failed request is not remembered, so the next attempt asks again.
        found.catch(() => cache.delete(partSlug));
        cache.set(partSlug, found);
      }
      return found;
    },
    async profile(partSlug: string): Promise<PartProfile> {
      return (await this.page(partSlug)).profile;
    },
  };
}
