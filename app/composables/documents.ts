import type { DocumentDetail, DocumentSaveResult, SaveDocument } from '@shared/contracts/projects';
import { http } from './http';

const d = (slug: string, id: number | string) => `/projects/${encodeURIComponent(slug)}/documents/${id}`;

/** Sections and log entries. A save may answer 409 `edit_conflict` (see ConflictResolver). */
export const documentsApi = {
  get: (slug: string, id: number | string) => http.get<DocumentDetail>(d(slug, id)),
  save: (slug: string, id: number | string, input: SaveDocument) => http.put<DocumentSaveResult>(d(slug, id), input),
};
