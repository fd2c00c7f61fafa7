import { and, asc, eq, sql } from 'drizzle-orm';
import type { DbOrTx } from '../../db/client';
import { firmwareBuilds, parts, projects } from '../../db/schema';
import type { ParsedSizeReport } from '../../shared/checks/size-report';
import type { PartProfile } from '../../shared/contracts/parts';

export type BuildView = Awaited<ReturnType<typeof listBuilds>>[number];

/** Oldest first: by build date, then by id (the order the chart and the ledger read). */
export async function listBuilds(db: DbOrTx, projectId: number) {
  const rows = await db
    .select({
      build: firmwareBuilds,
      partSlug: parts.slug,
      partName: parts.name,
      partProfile: parts.profile,
    })
    .from(firmwareBuilds)
    .leftJoin(parts, eq(parts.id, firmwareBuilds.partId))
    .where(eq(firmwareBuilds.projectId, projectId))
    .orderBy(sql`${firmwareBuilds.builtOn} asc nulls first`, asc(firmwareBuilds.id));
  return rows.map((r) => ({
    ...r,
    sections: r.build.sections as ParsedSizeReport,
    partProfile: r.partProfile as PartProfile | null,
  }));
}

export async function insertBuild(db: DbOrTx, values: typeof firmwareBuilds.$inferInsert): Promise<number> {
  const [row] = await db.insert(firmwareBuilds).values(values).returning({ id: firmwareBuilds.id });
  if (!row) throw new Error('insert into firmware_builds returned no row');
  return row.id;
}

export async function deleteBuild(db: DbOrTx, projectId: number, id: number): Promise<boolean> {
  const rows = await db
    .delete(firmwareBuilds)
    .where(and(eq(firmwareBuilds.projectId, projectId), eq(firmwareBuilds.id, id)))
    .returning({ id: firmwareBuilds.id });
  return rows.length === 1;
}

export async function setWarnPercent(db: DbOrTx, projectId: number, percent: number) {
  await db.update(projects).set({ memoryWarnPercent: percent }).where(eq(projects.id, projectId));
}

export async function warnPercent(db: DbOrTx, projectId: number): Promise<number> {
  const [row] = await db
    .select({ percent: projects.memoryWarnPercent })
    .from(projects)
    .where(eq(projects.id, projectId));
  return row?.percent ?? 90;
}
