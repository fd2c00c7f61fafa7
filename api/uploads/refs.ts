/**
 * Which content uses which upload. Every save of Markdown (and the cover photo) replaces its
 * subject's rows in `upload_refs` in the same transaction as the save, so the table is always
 * what the current content says. An upload that loses its last reference gets
 * `unreferenced_since = now()`; one that gains a reference loses it. The sweep
 * (api/uploads/jobs.ts) removes uploads unreferenced for longer than the grace period.
 *
 * Only uploads of the same project count: uploads belong to one project, and content elsewhere
 * pointing at them keeps nothing alive (nor does it show them, see api/uploads/images.ts).
 */
import type { Tx } from '../../db/client';
import { linkTargetsOf } from '../markdown/render';
import { uploadIdOfUrl } from './present';
import * as q from './queries';

export type RefSubject = 'document' | 'erratum' | 'lesson' | 'comment' | 'proposal' | 'project_cover' | 'board_revision';

/** Ids of uploads a text shows (images) or links (attachments), each once. */
export function uploadIdsIn(markdowns: readonly string[]): number[] {
  const ids = new Set<number>();
  for (const markdown of markdowns) {
    if (!markdown.includes('/api/uploads/')) continue;
    const { images, links } = linkTargetsOf(markdown);
    for (const url of [...images.map((i) => i.src), ...links]) {
      const id = uploadIdOfUrl(url);
      if (id !== null) ids.add(id);
    }
  }
  return [...ids].sort((a, b) => a - b);
}

/** Makes `subject`'s references exactly `uploadIds` (those of `projectId`; others are ignored). */
export async function replaceUploadRefs(
  tx: Tx,
  subject: RefSubject,
  subjectId: number,
  projectId: number,
  uploadIds: readonly number[],
): Promise<void> {
  const before = await q.deleteRefs(tx, subject, subjectId);
  const now = await q.idsInProject(tx, [...new Set(uploadIds)], projectId);
  await q.insertRefs(tx, subject, subjectId, now);
  await q.clearUnreferenced(tx, now);
  const kept = new Set(now);
  await q.markUnreferencedIfUnused(
    tx,
    before.filter((id) => !kept.has(id)),
  );
}

/** The references of a subject whose Markdown is `markdowns` (all its text fields). */
export async function syncUploadRefs(
  tx: Tx,
  subject: RefSubject,
  subjectId: number,
  projectId: number,
  markdowns: readonly string[],
): Promise<void> {
  await replaceUploadRefs(tx, subject, subjectId, projectId, uploadIdsIn(markdowns));
}
