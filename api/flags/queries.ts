import { and, eq, sql } from 'drizzle-orm';
import type { DbOrTx } from '../../db/client';
import { flags } from '../../db/schema';
import type { FlagReason } from '../../shared/domain';
import type { TargetRef } from '../moderation/targets';

export type FlagRow = typeof flags.$inferSelect;

/**
 * Inserts the member's flag unless they already have an open one on this target (the partial
 * unique index `flags_open_author_target_key`); returns the stored flag and whether it is new.
 */
export async function insertFlagOnce(
  db: DbOrTx,
  values: { target: TargetRef; projectId: number | null; authorId: number; reason: FlagReason; text: string },
): Promise<{ flag: FlagRow; created: boolean }> {
  const [inserted] = await db
    .insert(flags)
    .values({
      targetKind: values.target.kind,
      targetId: values.target.id,
      projectId: values.projectId,
      authorId: values.authorId,
      reason: values.reason,
      text: values.text,
    })
    .onConflictDoNothing({
      target: [flags.targetKind, flags.targetId, flags.authorId],
      where: sql`${flags.state} = 'open'`,
    })
    .returning();
  if (inserted) return { flag: inserted, created: true };
  const [existing] = await db
    .select()
    .from(flags)
    .where(
      and(
        eq(flags.targetKind, values.target.kind),
        eq(flags.targetId, values.target.id),
        eq(flags.authorId, values.authorId),
        eq(flags.state, 'open'),
      ),
    );
  if (!existing) throw new Error('an open flag conflicted but could not be read back');
  return { flag: existing, created: false };
}
