/**
 * The parts library: part pages with every readable erratum and lesson that mentions the part,
 * and moderators' corrections as revisions. A correction replaces the whole profile; it is based
 * on the revision the moderator read, and a save on an older one is refused with 409
 * `edit_conflict` and the current profile (profiles are not merged line by line: a threshold and
 * its source belong together).
 */
import { and, eq } from 'drizzle-orm';
import type { PartCreate, PartList, PartPage, PartRevisionList, PartUpdate } from '../../shared/contracts/checks';
import type { EditConflict } from '../../shared/contracts/projects';
import { parts, revisions } from '../../db/schema';
import { canonicalJson, partColumns, profileHash } from '../../db/parts/seed';
import { appendAudit } from '../audit/queries';
import type { AppContext } from '../context';
import { AppError, fail } from '../http/errors';
import type { AuthUser } from '../http/routes';
import { architectureOf } from './architecture';
import { mentionsOf, type ErratumCandidate, type LessonCandidate } from './mentions';
import * as q from './queries';

export const isModerator = (user: AuthUser | null) => user?.role === 'moderator' || user?.role === 'admin';

async function candidates(ctx: AppContext, viewer: AuthUser | null) {
  const [errata, lessons] = await Promise.all([
    q.erratumCandidates(ctx.db, viewer),
    q.lessonCandidates(ctx.db, viewer),
  ]);
  return { errata, lessons };
}

export async function listParts(ctx: AppContext, viewer: AuthUser | null): Promise<PartList> {
  const [rows, found] = await Promise.all([q.listParts(ctx.db), candidates(ctx, viewer)]);
  return {
    items: rows.map((row) => ({
      slug: row.slug,
      name: row.name,
      kind: row.kind,
      aliases: row.aliases,
      summary: row.profile.summary ?? null,
      pinCount: row.profile.pins.length,
      mentionCount: mentionsOf(row.profile, found.errata, found.lessons).length,
    })),
  };
}

export async function loadPart(ctx: AppContext, slug: string): Promise<q.PartRow> {
  const row = await q.findPartBySlug(ctx.db, slug);
  if (!row) throw fail.notFound('The part');
  return row;
}

function pageOf(
  row: q.PartRow,
  viewer: AuthUser | null,
  found: { errata: ErratumCandidate[]; lessons: LessonCandidate[] },
): PartPage {
  return {
    profile: row.profile,
    architecture: architectureOf(row),
    revision: row.currentRevision,
    updatedAt: row.updatedAt.toISOString(),
    mentions: mentionsOf(row.profile, found.errata, found.lessons),
    viewer: { canEdit: isModerator(viewer) },
  };
}

export async function partPage(ctx: AppContext, viewer: AuthUser | null, slug: string): Promise<PartPage> {
  const row = await loadPart(ctx, slug);
  return pageOf(row, viewer, await candidates(ctx, viewer));
}

export async function updatePart(
  ctx: AppContext,
  user: AuthUser,
  slug: string,
  input: Omit<PartUpdate, 'profile'> & { profile: q.PartRow['profile'] },
): Promise<PartPage> {
  if (input.profile.slug !== slug) {
    throw fail.validation('The profile names another part.', {
      issues: [{ path: 'profile.slug', message: `must be "${slug}", the part this page is for` }],
    });
  }
  const row = await loadPart(ctx, slug);
  await ctx.db.transaction(async (tx) => {
    const current = await q.lockPart(tx, row.id);
    if (!current) throw fail.notFound('The part');
    if (input.baseRevision > current.currentRevision) {
      throw fail.validation(
        `Revision ${input.baseRevision} does not exist yet (latest is ${current.currentRevision}).`,
        { issues: [{ path: 'baseRevision', message: 'newer than the latest revision' }] },
      );
    }
    if (input.baseRevision < current.currentRevision) {
      const [latest] = await q.partRevisions(tx, current.id);
      const details: EditConflict = {
        baseRevision: input.baseRevision,
        current: {
          revision: current.currentRevision,
          fields: { profile: current.profile },
          author: null,
          createdAt: (latest?.createdAt ?? current.updatedAt).toISOString(),
        },
        chunks: {},
        fieldConflicts: [{ field: 'profile', base: null, ours: input.profile, theirs: current.profile }],
        merged: {},
      };
      throw new AppError(
        'edit_conflict',
        `Someone saved revision ${current.currentRevision} of ${current.name} while you were editing revision ${input.baseRevision}. Compare your changes with the current profile and save again.`,
        details,
      );
    }
    if (canonicalJson(current.profile) === canonicalJson(input.profile)) return;
    const number = current.currentRevision + 1;
    const updated = await tx
      .update(parts)
      .set({ ...partColumns(input.profile), currentRevision: number, updatedAt: new Date() })
      .where(and(eq(parts.id, current.id), eq(parts.currentRevision, current.currentRevision)))
      .returning({ id: parts.id });
    if (updated.length !== 1)
      throw fail.conflict('This part is being saved by someone else right now. Reload and try again.');
    await tx.insert(revisions).values({
      subject: 'part',
      subjectId: current.id,
      projectId: null,
      number,
      parentNumber: current.currentRevision,
      authorId: user.id,
      message: input.note,
      fields: input.profile,
      contentHash: profileHash(input.profile),
      origin: 'edit',
    });
    await appendAudit(tx, {
      actorId: user.id,
      action: 'part.revise',
      targetKind: 'part',
      targetId: current.id,
      after: { revision: number, note: input.note },
    });
  });
  return partPage(ctx, user, slug);
}

/** A moderator adds a part: revision 1, authored by them; a taken slug is a 409. */
export async function createPart(
  ctx: AppContext,
  user: AuthUser,
  input: Omit<PartCreate, 'profile'> & { profile: q.PartRow['profile'] },
): Promise<PartPage> {
  const { profile } = input;
  await ctx.db.transaction(async (tx) => {
    const [created] = await tx
      .insert(parts)
      .values({ ...partColumns(profile), currentRevision: 1 })
      .onConflictDoNothing({ target: parts.slug })
      .returning({ id: parts.id });
    if (!created) throw fail.conflict(`A part with the slug "${profile.slug}" is already in the library.`);
    await tx.insert(revisions).values({
      subject: 'part',
      subjectId: created.id,
      projectId: null,
      number: 1,
      parentNumber: null,
      authorId: user.id,
      message: input.note,
      fields: profile,
      contentHash: profileHash(profile),
      origin: 'create',
    });
    await appendAudit(tx, {
      actorId: user.id,
      action: 'part.create',
      targetKind: 'part',
      targetId: created.id,
      after: { slug: profile.slug, name: profile.name, note: input.note },
    });
  });
  return partPage(ctx, user, profile.slug);
}

export async function partRevisionList(ctx: AppContext, slug: string): Promise<PartRevisionList> {
  const row = await loadPart(ctx, slug);
  const rows = await q.partRevisions(ctx.db, row.id);
  return {
    items: rows.map((r) => ({
      number: r.number,
      note: r.message,
      author: r.handle !== null && r.displayName !== null ? { handle: r.handle, displayName: r.displayName } : null,
      createdAt: r.createdAt.toISOString(),
    })),
  };
}
