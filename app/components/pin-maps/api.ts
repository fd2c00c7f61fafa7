/** Typed access to a project's pin maps, through the one HTTP client. */
import type { PinMap, PinMapCreate, PinMapList, PinMapUpdate } from '@shared/contracts/checks';
import { http } from '@/composables/http';

const enc = encodeURIComponent;
const base = (slug: string) => `/projects/${enc(slug)}/pin-maps`;

export const pinMapsApi = {
  list: (slug: string) => http.get<PinMapList>(base(slug)),
  create: (slug: string, input: PinMapCreate) => http.post<PinMap>(base(slug), input),
  update: (slug: string, id: number, input: PinMapUpdate) => http.put<PinMap>(`${base(slug)}/${id}`, input),
  remove: (slug: string, id: number) => http.delete<void>(`${base(slug)}/${id}`),
};
