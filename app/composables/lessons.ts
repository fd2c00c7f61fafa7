/**
 * Typed access to a project's lessons learned. Components call these, never fetch.
 */
import type { Lesson, LessonInput, LessonList } from '@shared/contracts/errata';
import type { SaveOutcome } from '@shared/contracts/projects';
import { http } from './http';

export interface SaveLesson extends LessonInput {
  baseRevision: number;
  message?: string;
}

export interface LessonSaveResult {
  outcome: SaveOutcome;
  lesson: Lesson;
}

const base = (slug: string) => `/projects/${encodeURIComponent(slug)}/lessons`;

export const lessonsApi = {
  list: (slug: string) => http.get<LessonList>(base(slug)),
  create: (slug: string, input: LessonInput) => http.post<Lesson>(base(slug), input),
  save: (slug: string, id: number, input: SaveLesson) => http.put<LessonSaveResult>(`${base(slug)}/${id}`, input),
  remove: (slug: string, id: number) => http.delete<void>(`${base(slug)}/${id}`),
};
