/**
 * Puts the shipped part profiles (db/parts/*.json) into the `parts` table. Parts are reference
 * data: the server runs this at every start, demo data or not, and the demo seed runs it before
 * it links pin maps and builds to parts.
 *
 * - A profile missing from the table is inserted at revision 1, with its revision row (no author:
 *   the product shipped it).
 * - A part still at revision 1 whose shipped profile changed is updated in place. Its revision 1
 *   row keeps the content first shipped (revisions are immutable); the part row is what pages,
 *   checks and moderators' edits work from.
 * - A part a moderator has revised (revision > 1) is never touched: the correction wins over
 *   the file until someone folds it back into the data file.
 *
 * Idempotent, in one transaction; concurrent starts are safe (inserts skip on the slug's key and
 * the rows are locked before they are compared).
 */
import { createHash } from 'node:crypto';
import { and, eq, inArray } from 'drizzle-orm';
import type { PartProfile } from '../../shared/contracts/parts';
import type { DbOrTx } from '../client';
import { parts, revisions } from '../schema';
import { loadPartProfiles } from './load';

export interface SeedPartsResult {
  inserted: string[];
  updated: string[];
  /** Revised by a moderator: left as they are. */
  kept: string[];
  unchanged: string[];
}

/** JSON with object keys sorted at every level: jsonb reorders keys, so compare this way. */
export function canonicalJson(value: unknown): string {
  if (Array.isArray(value)) return `[${value.map(canonicalJson).join(',')}]`;
  if (value !== null && typeof value === 'object') {
    const entries = Object.entries(value as Record<string, unknown>)
      .filter(([, v]) => v !== undefined)
      .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
    return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${canonicalJson(v)}`).join(',')}}`;
  }
  return JSON.stringify(value);
}

export function profileHash(profile: unknown): string {
  return createHash('sha256').update(canonicalJson(profile)).digest('hex');
}

/** The columns a profile fills besides `profile` itself. */
export function partColumns(profile: PartProfile) {
  return { slug: profile.slug, name: profile.name, kind: profile.kind, aliases: profile.aliases, profile };
}

export async function seedParts(db: DbOrTx, profiles: PartProfile[] = loadPartProfiles()): Promise<SeedPartsResult> {
  const result: SeedPartsResult = { inserted: [], updated: [], kept: [], unchanged: [] };
  if (!profiles.length) return result;
  await db.transaction(async (tx) => {
    for (const profile of profiles) {
      const [created] = await tx
        .insert(parts)
        .values({ ...partColumns(profile), currentRevision: 1 })
        .onConflictDoNothing({ target: parts.slug })
        .returning({ id: parts.id });
      if (created) {
        await tx.insert(revisions).values({
          subject: 'part',
          subjectId: created.id,
          projectId: null,
          number: 1,
          parentNumber: null,
          authorId: null,
          message: `Profile as shipped in db/parts (${profile.datasheets.map((d) => d.title).join('; ')})`,
          fields: profile,
          contentHash: profileHash(profile),
          origin: 'create',
        });
        result.inserted.push(profile.slug);
      }
    }
    const slugs = profiles.map((p) => p.slug);
    const existing = await tx
      .select({ id: parts.id, slug: parts.slug, revision: parts.currentRevision, profile: parts.profile })
      .from(parts)
      .where(inArray(parts.slug, slugs))
      .for('update');
    const bySlug = new Map(existing.map((row) => [row.slug, row]));
    for (const profile of profiles) {
      if (result.inserted.includes(profile.slug)) continue;
      const row = bySlug.get(profile.slug);
      if (!row) continue;
      if (row.revision > 1) {
        result.kept.push(profile.slug);
        continue;
      }
      if (canonicalJson(row.profile) === canonicalJson(profile)) {
        result.unchanged.push(profile.slug);
        continue;
      }
      await tx
        .update(parts)
        .set({ ...partColumns(profile), updatedAt: new Date() })
        .where(and(eq(parts.id, row.id), eq(parts.currentRevision, 1)));
      result.updated.push(profile.slug);
    }
  });
  return result;
}
