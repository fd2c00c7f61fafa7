/**
 * Typed access to projects for pages. Components call these, never fetch.
 */
import type {
  BoardRevision,
  BoardRevisionInput,
  CreateProject,
  DeletedProject,
  DocumentDetail,
  NewLogEntry,
  NewSection,
  ProjectDetail,
  ProjectList,
  ProjectSaveResult,
  UpdateProject,
} from '@shared/contracts/projects';
import { ref, type Ref } from 'vue';
import { ApiError, http } from './http';

const p = (slug: string) => `/projects/${encodeURIComponent(slug)}`;

export const projectsApi = {
  listPublished: (page = 1) => http.get<ProjectList>('/projects', { query: { page } }),
  listMine: () => http.get<ProjectList>('/me/projects'),
  create: (input: CreateProject) => http.post<ProjectDetail>('/projects', input),
  get: (slug: string) => http.get<ProjectDetail>(p(slug)),
  update: (slug: string, input: UpdateProject) => http.put<ProjectSaveResult>(p(slug), input),
  publish: (slug: string) => http.post<ProjectDetail>(`${p(slug)}/publish`),
  unpublish: (slug: string) => http.post<ProjectDetail>(`${p(slug)}/unpublish`),
  remove: (slug: string, confirmSlug: string) => http.delete<void>(p(slug), { body: { confirmSlug } }),
  addEditor: (slug: string, handle: string) => http.post<ProjectDetail>(`${p(slug)}/editors`, { handle }),
  removeEditor: (slug: string, handle: string) =>
    http.delete<ProjectDetail>(`${p(slug)}/editors/${encodeURIComponent(handle)}`),
  addBoard: (slug: string, input: BoardRevisionInput) => http.post<BoardRevision>(`${p(slug)}/board-revisions`, input),
  updateBoard: (slug: string, id: number, input: BoardRevisionInput) =>
    http.put<BoardRevision>(`${p(slug)}/board-revisions/${id}`, input),
  removeBoard: (slug: string, id: number) => http.delete<void>(`${p(slug)}/board-revisions/${id}`),
  addSection: (slug: string, input: NewSection) => http.post<DocumentDetail>(`${p(slug)}/sections`, input),
  addLogEntry: (slug: string, input: NewLogEntry) => http.post<DocumentDetail>(`${p(slug)}/log`, input),
  reorderSections: (slug: string, ids: number[]) => http.put<ProjectDetail>(`${p(slug)}/sections/order`, { ids }),
  removeDocument: (slug: string, id: number) => http.delete<void>(`${p(slug)}/documents/${id}`),
  listDeleted: () => http.get<{ items: DeletedProject[] }>('/admin/projects/deleted'),
  restoreDeleted: (slug: string) => http.post<ProjectDetail>(`/admin/projects/${encodeURIComponent(slug)}/restore`),
};

/** A project page's data: the detail, with 404/403 turned into a state the page shows. */
export function useProject(slug: () => string) {
  const project: Ref<ProjectDetail | null> = ref(null);
  const missing = ref(false);
  const loading = ref(false);

  async function load() {
    loading.value = true;
    missing.value = false;
    try {
      project.value = await projectsApi.get(slug());
    } catch (error) {
      if (error instanceof ApiError && error.code === 'not_found') {
        project.value = null;
        missing.value = true;
        return;
      }
      throw error;
    } finally {
      loading.value = false;
    }
  }

  return { project, missing, loading, load };
}
