/** The parts library routes (shared/contracts/checks.ts), through the one HTTP client. */
import type { PartCreate, PartList, PartPage, PartRevisionList, PartUpdate } from '@shared/contracts/checks';
import { http } from '@/composables/http';

const one = (slug: string) => `/parts/${encodeURIComponent(slug)}`;

export const partsApi = {
  list: () => http.get<PartList>('/parts'),
  get: (slug: string) => http.get<PartPage>(one(slug)),
  revisions: (slug: string) => http.get<PartRevisionList>(`${one(slug)}/revisions`),
  create: (body: PartCreate) => http.post<PartPage>('/parts', body),
  update: (slug: string, body: PartUpdate) => http.put<PartPage>(one(slug), body),
};
