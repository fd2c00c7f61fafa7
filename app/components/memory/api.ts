/**
 * Typed access to a project's firmware builds (the memory budget). Kept beside the memory
 * components because this feature's files live here; it goes through the one HTTP client.
 */
import type { BuildCreate, BuildList, BuildSettings, FirmwareBuild } from '@shared/contracts/checks';
import { http } from '@/composables/http';

const base = (slug: string) => `/projects/${encodeURIComponent(slug)}/builds`;

export const buildsApi = {
  list: (slug: string) => http.get<BuildList>(base(slug)),
  create: (slug: string, input: BuildCreate) => http.post<FirmwareBuild>(base(slug), input),
  remove: (slug: string, id: number) => http.delete<void>(`${base(slug)}/${id}`),
  settings: (slug: string, input: BuildSettings) => http.put<BuildList>(`${base(slug)}/settings`, input),
};
