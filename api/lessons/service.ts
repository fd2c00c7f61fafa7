/**
 * Lessons learned: short statements per project, tagged, optionally linked to the project's
 * errata. Body and erratum links are versioned (revisions, no lost updates); tags ride along
 * like on errata, since moderators curate them separately.
 */
import { and, asc, eq, inArray, isNull, max, notInArray, sql } from 'drizzle-orm';
import type { Lesson, LessonInput, LessonList } from '../../shared/contracts/errata';
import { lessonInputSchema } from '../../shared/contracts/errata';
import type { ProjectRole } from '../../shared/domain';
import type { DbOrTx, Tx } from '../../db/client';
import { errata, lessonErrata, lessonTags, lessons } from '../../db/schema';
import type { AppContext } from '../context';
import { fail } from '../http/errors';
import type { AuthUser } from '../http/routes';
import { renderCached } from '../markdown/cache';
import type { ProjectRow } from '../projects/queries';
import { touchProject } from '../projects/queries';
import { viewerOf } from '../projects/service';
import { insertRevision } from '../revisions/queries';
import { contentHash, saveVersioned, type SaveResult, type VersionedStore } from '../revisions/versioned';
import { currentTagIds, resolveTagIds, tagRefsByIds } from '../tags/service';
import { imagesForMarkdown } from '../uploads/images';
import { syncUploadRefs } from '../uploads/refs';
import { hiddenOf, seesHidden } from '../moderation/visibility';

type LessonRow = typeof lessons.$inferSelect;
interface LessonFields {
  [key: string]: string | string[];
  body: string;
  errata: string[];
}

async function erratumIdsFor(db: DbOrTx, projectId: number, numbers: number[]): Promise<Map<number, number>> {
  if (!numbers.length) return new Map();
  const rows = await db
    .select({ id: errata.id, number: errata.number })
    .from(errata)
    .where(and(eq(errata.projectId, projectId), inArray(errata.number, numbers)));
  const map = new Map(rows.map((r) => [r.number, r.id]));
  const missing = numbers.filter((n) => !map.has(n));
  if (missing.length) {
    throw fail.validation('Link only errata of this project.', {
      issues: [{ path: 'errata', message: `no ${missing.map((n) => `E${n}`).join(', ')} here` }],
    });
  }
  return map;
}

async function linkErrata(tx: Tx, lessonId: number, erratumIds: number[]) {
  await tx.delete(lessonErrata).where(eq(lessonErrata.lessonId, lessonId));
  if (erratumIds.length) await tx.insert(lessonErrata).values(erratumIds.map((erratumId) => ({ lessonId, erratumId })));
}

/**
 * The lesson's tags become `tagIds`. Links it keeps stay as they are, so a link a merge moved
 * still knows its original tag and an unmerge can put it back after the lesson was saved again.
 */
async function setTags(tx: Tx, lessonId: number, tagIds: number[]) {
  const wanted = [...new Set(tagIds)];
  await tx
    .delete(lessonTags)
    .where(and(eq(lessonTags.subjectId, lessonId), wanted.length ? notInArray(lessonTags.tagId, wanted) : undefined));
  if (wanted.length)
    await tx
      .insert(lessonTags)
      .values(wanted.map((tagId) => ({ subjectId: lessonId, tagId, originalTagId: tagId })))
      .onConflictDoNothing();
}

async function present(ctx: AppContext, rows: LessonRow[]): Promise<Lesson[]> {
  const ids = rows.map((r) => r.id);
  if (!ids.length) return [];
  const images = await imagesForMarkdown(
    ctx.db,
    rows.map((r) => r.body),
    rows[0]!.projectId,
  );
  const tagRows = await ctx.db.select().from(lessonTags).where(inArray(lessonTags.subjectId, ids));
  const refs = await tagRefsByIds(ctx.db, [...new Set(tagRows.map((t) => t.tagId))]);
  const links = await ctx.db
    .select({ lessonId: lessonErrata.lessonId, number: errata.number, title: errata.title })
    .from(lessonErrata)
    .innerJoin(errata, eq(errata.id, lessonErrata.erratumId))
    .where(and(inArray(lessonErrata.lessonId, ids), isNull(errata.hiddenAt)))
    .orderBy(asc(errata.number));
  return rows.map((row) => ({
    id: row.id,
    body: row.body,
    html: renderCached(`lesson:${row.id}:${row.currentRevision}`, row.body, `l${row.id}-`, images).html,
    tags: tagRows
      .filter((t) => t.subjectId === row.id)
      .map((t) => refs.get(t.tagId)!)
      .filter(Boolean),
    errata: links
      .filter((l) => l.lessonId === row.id)
      .map((l) => ({ number: l.number, code: `E${l.number}`, title: l.title })),
    revision: row.currentRevision,
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
    hidden: hiddenOf(row),
  }));
}

/** Hidden lessons are listed, marked, only to the project's members and the moderators. */
export async function listLessons(
  ctx: AppContext,
  project: ProjectRow,
  role: ProjectRole | null,
  user: AuthUser | null = null,
): Promise<LessonList> {
  const withHidden = seesHidden({ user, projectRole: role });
  const rows = await ctx.db
    .select()
    .from(lessons)
    .where(and(eq(lessons.projectId, project.id), withHidden ? undefined : isNull(lessons.hiddenAt)))
    .orderBy(asc(lessons.position), asc(lessons.id));
  return { items: await present(ctx, rows), viewer: viewerOf(role) };
}

async function load(db: DbOrTx, project: ProjectRow, id: number): Promise<LessonRow> {
  const [row] = await db
    .select()
    .from(lessons)
    .where(and(eq(lessons.projectId, project.id), eq(lessons.id, id), isNull(lessons.hiddenAt)));
  if (!row) throw fail.notFound('The lesson');
  return row;
}

export async function createLesson(
  ctx: AppContext,
  user: AuthUser,
  project: ProjectRow,
  input: LessonInput,
): Promise<Lesson> {
  const parsed = lessonInputSchema.parse(input);
  const row = await ctx.db.transaction(async (tx) => {
    const erratumIds = await erratumIdsFor(tx, project.id, parsed.errata);
    const [{ p } = { p: null }] = await tx
      .select({ p: max(lessons.position) })
      .from(lessons)
      .where(eq(lessons.projectId, project.id));
    const [created] = await tx
      .insert(lessons)
      .values({
        projectId: project.id,
        body: parsed.body,
        position: (p ?? -1) + 1,
        createdBy: user.id,
        currentRevision: 1,
      })
      .returning();
    const fields: LessonFields = { body: parsed.body, errata: parsed.errata.map(String) };
    await insertRevision(tx, {
      subject: 'lesson',
      subjectId: created!.id,
      projectId: project.id,
      number: 1,
      parentNumber: null,
      authorId: user.id,
      message: 'Wrote the lesson',
      body: parsed.body,
      fields,
      contentHash: contentHash(fields),
      origin: 'create',
    });
    await linkErrata(tx, created!.id, [...erratumIds.values()]);
    await setTags(tx, created!.id, await resolveTagIds(tx, user, parsed.tags));
    await syncUploadRefs(tx, 'lesson', created!.id, project.id, [parsed.body]);
    await touchProject(tx, project.id);
    return created!;
  });
  const [lesson] = await present(ctx, [row]);
  return lesson!;
}

function lessonStore(project: ProjectRow, row: LessonRow): VersionedStore<LessonFields> {
  return {
    subject: 'lesson',
    subjectId: row.id,
    projectId: project.id,
    textFields: ['body'],
    async loadCurrent(tx) {
      const [current] = await tx.select().from(lessons).where(eq(lessons.id, row.id)).for('update');
      if (!current) throw fail.notFound('The lesson');
      const links = await tx
        .select({ number: errata.number })
        .from(lessonErrata)
        .innerJoin(errata, eq(errata.id, lessonErrata.erratumId))
        .where(eq(lessonErrata.lessonId, row.id));
      return {
        revision: current.currentRevision,
        fields: { body: current.body, errata: links.map((l) => String(l.number)).sort() },
      };
    },
    async write(tx, expected, fields) {
      const updated = await tx
        .update(lessons)
        .set({ body: fields.body, currentRevision: sql`${lessons.currentRevision} + 1`, updatedAt: new Date() })
        .where(and(eq(lessons.id, row.id), eq(lessons.currentRevision, expected)))
        .returning({ id: lessons.id });
      if (updated.length !== 1) return false;
      const ids = await erratumIdsFor(tx, project.id, fields.errata.map(Number));
      await linkErrata(tx, row.id, [...ids.values()]);
      await syncUploadRefs(tx, 'lesson', row.id, project.id, [fields.body]);
      return true;
    },
    toRow: (fields) => ({ body: fields.body, fields }),
    fromRow: (stored) => stored.fields as LessonFields,
  };
}

export async function saveLesson(
  ctx: AppContext,
  user: AuthUser,
  project: ProjectRow,
  id: number,
  input: LessonInput,
  baseRevision: number,
  message: string,
): Promise<{ outcome: SaveResult['outcome']; lesson: Lesson }> {
  const parsed = lessonInputSchema.parse(input);
  const row = await load(ctx.db, project, id);
  await erratumIdsFor(ctx.db, project.id, parsed.errata);
  const result = await saveVersioned(
    ctx.db,
    lessonStore(project, row),
    {
      authorId: user.id,
      baseRevision,
      fields: { body: parsed.body, errata: parsed.errata.map(String).sort() },
      message,
      origin: 'edit',
    },
    async (tx) => {
      await setTags(tx, row.id, await resolveTagIds(tx, user, parsed.tags, await currentTagIds(tx, 'lesson', row.id)));
      await touchProject(tx, project.id);
    },
  );
  if (result.outcome === 'unchanged') {
    await ctx.db.transaction(async (tx) => {
      await setTags(tx, row.id, await resolveTagIds(tx, user, parsed.tags, await currentTagIds(tx, 'lesson', row.id)));
      await touchProject(tx, project.id);
    });
  }
  const [lesson] = await present(ctx, [await load(ctx.db, project, id)]);
  return { outcome: result.outcome, lesson: lesson! };
}

export async function removeLesson(ctx: AppContext, project: ProjectRow, id: number): Promise<void> {
  await load(ctx.db, project, id);
  await ctx.db.transaction(async (tx) => {
    await tx.delete(lessons).where(and(eq(lessons.projectId, project.id), eq(lessons.id, id)));
    await syncUploadRefs(tx, 'lesson', id, project.id, []);
    await touchProject(tx, project.id);
  });
}
