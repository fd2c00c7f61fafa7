/**
 * Publishing needs alt text: every photo the project's content shows must say what it shows,
 * either in the Markdown (`![the relay bodge](…)`) or on the upload itself (its alt text, which
 * the renderer uses when the Markdown gives none). The cover photo needs the upload's alt text.
 * What is missing comes back as the `MissingAltText` details of a 400, so the client can ask for
 * each photo in turn and publish again.
 */
import type { MissingAltText } from '../../shared/contracts/uploads';
import type { AppContext } from '../context';
import { listErrata } from '../errata/queries';
import { linkTargetsOf } from '../markdown/render';
import { listBoardRevisions, listLiveDocuments, type ProjectRow } from '../projects/queries';
import { lessons } from '../../db/schema';
import { and, asc, eq, isNull } from 'drizzle-orm';
import { fileUrl, uploadIdOfUrl, variantFile } from './present';
import { uploadsByIds } from './queries';

interface Usage {
  uploadId: number;
  markdownAlt: string;
  usedIn: string;
}

function usagesIn(markdown: string, usedIn: string): Usage[] {
  if (!markdown.includes('/api/uploads/')) return [];
  return linkTargetsOf(markdown).images.flatMap((image) => {
    const uploadId = uploadIdOfUrl(image.src);
    return uploadId === null ? [] : [{ uploadId, markdownAlt: image.alt, usedIn }];
  });
}

export async function missingAltText(ctx: AppContext, project: ProjectRow): Promise<MissingAltText | null> {
  const [docs, errata, boards, lessonRows] = await Promise.all([
    listLiveDocuments(ctx.db, project.id),
    listErrata(ctx.db, project.id),
    listBoardRevisions(ctx.db, project.id),
    ctx.db
      .select({ id: lessons.id, body: lessons.body })
      .from(lessons)
      .where(and(eq(lessons.projectId, project.id), isNull(lessons.hiddenAt)))
      .orderBy(asc(lessons.position), asc(lessons.id)),
  ]);
  const usages: Usage[] = [
    ...docs
      .filter((d) => d.kind === 'section')
      .flatMap((d) => usagesIn(d.body, `Section “${d.title}”`)),
    ...docs
      .filter((d) => d.kind === 'log_entry')
      .flatMap((d) => usagesIn(d.body, `Log entry “${d.title}”${d.loggedOn ? ` (${d.loggedOn})` : ''}`)),
    ...errata.flatMap((e) => [e.symptom, e.cause, e.workaround, e.fix].flatMap((text) => usagesIn(text, `Erratum E${e.number} “${e.title}”`))),
    ...lessonRows.flatMap((l, index) => usagesIn(l.body, `Lesson ${index + 1}`)),
    ...boards.flatMap((b) => usagesIn(b.notes, `Notes of board revision ${b.label}`)),
    ...(project.coverUploadId !== null ? [{ uploadId: project.coverUploadId, markdownAlt: '', usedIn: 'Cover photo' }] : []),
  ];
  const unlabelled = usages.filter((u) => !u.markdownAlt.trim());
  if (!unlabelled.length) return null;
  // Only this project's photos count: anything else is not shown (see api/uploads/images.ts).
  const rows = new Map(
    (
      await uploadsByIds(
        ctx.db,
        project.id,
        unlabelled.map((u) => u.uploadId),
      )
    ).map((r) => [r.id, r]),
  );
  const images: MissingAltText['images'] = [];
  for (const usage of unlabelled) {
    const row = rows.get(usage.uploadId);
    if (!row || row.altText.trim() || row.state === 'failed') continue;
    const known = images.find((i) => i.uploadId === row.id);
    if (known) {
      if (!known.usedIn.split(', ').includes(usage.usedIn)) known.usedIn = `${known.usedIn}, ${usage.usedIn}`;
      continue;
    }
    const thumb = variantFile(row, 'thumb');
    images.push({
      uploadId: row.id,
      name: row.originalName,
      thumbUrl: thumb ? fileUrl(row.id, `thumb.${thumb.ext}`) : null,
      usedIn: usage.usedIn,
    });
  }
  return images.length ? { images } : null;
}
