/**
 * The search port. Two adapters speak it: PostgreSQL full-text (the embedded default) and
 * Meilisearch (when MEILISEARCH_URL is set). The PostgreSQL index is always kept (the indexer
 * reads its own state from it); Meilisearch, when configured, gets the same documents and answers
 * the searches. One contract test suite runs against both.
 */
import type { SearchQuery, SearchResult } from '../../shared/contracts/search';
import type { SearchDocument } from './documents';

/** Who is searching: what they may see beyond published content. */
export interface SearchViewer {
  /** Admins see drafts and hidden content. */
  admin: boolean;
  /** Projects whose drafts the viewer may see (owner or editor). */
  memberProjectIds: number[];
}

export const ANONYMOUS: SearchViewer = { admin: false, memberProjectIds: [] };

export interface SearchBackend {
  readonly name: SearchResult['backend'];
  /** Insert or replace documents (keyed by kind and refId). */
  upsert(docs: SearchDocument[]): Promise<void>;
  /** Remove documents (gone, or no longer indexed). */
  remove(refs: Array<{ kind: SearchDocument['kind']; refId: number }>): Promise<void>;
  search(query: SearchQuery, viewer: SearchViewer): Promise<SearchResult>;
  /** Drop everything (full reindex). */
  clear(): Promise<void>;
}
