/**
 * Discussion threads on proposals and errata. Each thread is handed to DiscussionThread as a pair
 * of functions (`load`, `post`), so the component never knows which kind of thing it sits on.
 */
import type { Comment, CommentList } from '@shared/contracts/errata';
import { http } from './http';

export interface DiscussionSource {
  load: () => Promise<CommentList>;
  post: (body: string) => Promise<Comment>;
}

function thread(path: string): DiscussionSource {
  return {
    load: () => http.get<CommentList>(path),
    post: (body: string) => http.post<Comment>(path, { body }),
  };
}

export const commentsApi = {
  /** The discussion of a proposal. */
  proposal: (proposalId: number | string) => thread(`/proposals/${encodeURIComponent(String(proposalId))}/comments`),
  /** The discussion of an erratum (`number` as in E3 → 3). */
  erratum: (slug: string, number: number) => thread(`/projects/${encodeURIComponent(slug)}/errata/${number}/comments`),
};
