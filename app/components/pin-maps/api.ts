/**
 * Typed access to a project's pin maps and to the part profiles they are checked against. Kept
 * beside the pin map components because this feature's files live here; it goes through the one
 * HTTP client like every composable.
 */
import type {
  PartList,
  PartPage,
  PinCheckResult,
  PinMap,
  PinMapCreate,
  PinMapList,
  PinMapUpdate,
} from '@shared/contracts/checks';
import type { PartProfile } from '@shared/contracts/parts';
import { http } from '@/composables/http';

const enc = encodeURIComponent;
const base = (slug: string) => `/projects/${enc(slug)}/pin-maps`;

export const pinMapsApi = {
  list: (slug: string) => http.get<PinMapList>(base(slug)),
  create: (slug: string, input: PinMapCreate) => http.post<PinMap>(base(slug), input),
  update: (slug: string, id: number, input: PinMapUpdate) => http.put<PinMap>(`${base(slug)}/${id}`, input),
  remove: (slug: string, id: number) => http.delete<void>(`${base(slug)}/${id}`),
  check: (slug: string, id: number) => http.get<PinCheckResult>(`${base(slug)}/${id}/check`),
};

export const partsLookup = {
  list: () => http.get<PartList>('/parts'),
  get: (partSlug: string) => http.get<PartPage>(`/parts/${enc(partSlug)}`),
};

/** Part pages are fetched once per page visit: several pin maps often share a part. */
export function usePartProfiles() {
  const cache = new Map<string, Promise<PartPage>>();
  return {
    page(partSlug: string): Promise<PartPage> {
      let found = cache.get(partSlug);
      if (!found) {
        found = partsLookup.get(partSlug);
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
