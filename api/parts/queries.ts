import { and, asc, desc, eq, inArray, isNull, or, sql, type SQL } from 'drizzle-orm';
import type { DbOrTx } from '../../db/client';
import { errata, lessonErrata, lessons, parts, projectMembers, projects, revisions, users } from '../../db/schema';
import type { PartProfile } from '../../shared/contracts/parts';
import type { AuthUser } from '../http/routes';
import { plainTextOf } from '../markdown/render';
import type { ErratumCandidate, LessonCandidate } from './mentions';

export type PartRow = Omit<typeof parts.$inferSelect, 'profile'> & { profile: PartProfile };

export async function listParts(db: DbOrTx): Promise<PartRow[]> {
  const rows = await db.select().from(parts).orderBy(asc(parts.kind), asc(parts.name));
  return rows as PartRow[];
}

export async function findPartBySlug(db: DbOrTx, slug: string): Promise<PartRow | undefined> {
  const [row] = await db.select().from(parts).where(eq(parts.slug, slug));
  return row as PartRow | undefined;
}

export async function findPartById(db: DbOrTx, id: number): Promise<PartRow | undefined> {
  const [row] = await db.select().from(parts).where(eq(parts.id, id));
  return row as PartRow | undefined;
}

export async function lockPart(db: DbOrTx, id: number): Promise<PartRow | undefined> {
  const [row] = await db.select().from(parts).where(eq(parts.id, id)).for('update');
  return row as PartRow | undefined;
}

export async function partRevisions(db: DbOrTx, partId: number) {
  return db
    .select({
      number: revisions.number,
      message: revisions.message,
      createdAt: revisions.createdAt,
      handle: users.handle,
      displayName: users.displayName,
    })
    .from(revisions)
    .leftJoin(users, eq(users.id, revisions.authorId))
    .where(and(eq(revisions.subject, 'part'), eq(revisions.subjectId, partId)))
    .orderBy(desc(revisions.number));
}

/**
 * Projects whose items the viewer may read, as errata lists and search apply it
 * (api/projects/access.ts canRead): published and not hidden for everyone; a member also reads
 * their own projects' drafts; an admin reads everything. Deleted projects are gone for all.
 */
function readableProjects(viewer: AuthUser | null): SQL {
  const open = and(eq(projects.status, 'published'), isNull(projects.hiddenAt))!;
  const live = isNull(projects.deletedAt);
  if (viewer?.role === 'admin') return live;
  if (!viewer) return and(live, open)!;
  const member = inArray(
    projects.id,
    sql`(select ${projectMembers.projectId} from ${projectMembers} where ${projectMembers.userId} = ${viewer.id})`,
  );
  return and(live, or(open, member))!;
}

export async function erratumCandidates(db: DbOrTx, viewer: AuthUser | null): Promise<ErratumCandidate[]> {
  return db
    .select({
      id: errata.id,
      number: errata.number,
      title: errata.title,
      parts: errata.parts,
      pins: errata.pins,
      severity: errata.severity,
      updatedAt: errata.updatedAt,
      projectSlug: projects.slug,
      projectTitle: projects.title,
    })
    .from(errata)
    .innerJoin(projects, eq(projects.id, errata.projectId))
    .where(and(isNull(errata.hiddenAt), readableProjects(viewer), sql`cardinality(${errata.parts}) > 0`));
}

export async function lessonCandidates(db: DbOrTx, viewer: AuthUser | null): Promise<LessonCandidate[]> {
  const rows = await db
    .select({
      id: lessons.id,
      body: lessons.body,
      updatedAt: lessons.updatedAt,
      projectSlug: projects.slug,
      projectTitle: projects.title,
      erratumIds: sql<
        number[]
      >`coalesce((select array_agg(${lessonErrata.erratumId}) from ${lessonErrata} where ${lessonErrata.lessonId} = ${lessons.id}), '{}')`,
    })
    .from(lessons)
    .innerJoin(projects, eq(projects.id, lessons.projectId))
    .where(and(isNull(lessons.hiddenAt), readableProjects(viewer)));
  return rows.map(({ body, ...row }) => ({ ...row, erratumIds: row.erratumIds.map(Number), text: plain(body) }));
}

function plain(markdown: string): string {
  try {
    return plainTextOf(markdown);
  } catch {
    return markdown;
  }
}
