import { and, asc, eq } from 'drizzle-orm';
import type { DbOrTx } from '../../db/client';
import { boardRevisions, parts, pinMaps } from '../../db/schema';
import type { PinMapRow as PinRow } from '../../shared/contracts/parts';

export type PinMapRecord = Omit<typeof pinMaps.$inferSelect, 'rows'> & { rows: PinRow[] };

const columns = {
  id: pinMaps.id,
  projectId: pinMaps.projectId,
  boardRevisionId: pinMaps.boardRevisionId,
  boardLabel: boardRevisions.label,
  partId: pinMaps.partId,
  partSlug: parts.slug,
  partName: parts.name,
  supplyVolts: pinMaps.supplyVolts,
  rows: pinMaps.rows,
  currentRevision: pinMaps.currentRevision,
  updatedAt: pinMaps.updatedAt,
};

export type PinMapView = Omit<Awaited<ReturnType<typeof selectViews>>[number], 'rows'> & { rows: PinRow[] };

function selectViews(db: DbOrTx) {
  return db
    .select(columns)
    .from(pinMaps)
    .innerJoin(boardRevisions, eq(boardRevisions.id, pinMaps.boardRevisionId))
    .innerJoin(parts, eq(parts.id, pinMaps.partId));
}

export async function listPinMaps(db: DbOrTx, projectId: number): Promise<PinMapView[]> {
  const rows = await selectViews(db)
    .where(eq(pinMaps.projectId, projectId))
    .orderBy(asc(boardRevisions.position), asc(boardRevisions.id), asc(parts.name), asc(pinMaps.id));
  return rows as PinMapView[];
}

export async function findPinMap(db: DbOrTx, projectId: number, id: number): Promise<PinMapView | undefined> {
  const [row] = await selectViews(db).where(and(eq(pinMaps.projectId, projectId), eq(pinMaps.id, id)));
  return row as PinMapView | undefined;
}

export async function lockPinMap(db: DbOrTx, projectId: number, id: number): Promise<PinMapRecord | undefined> {
  const [row] = await db
    .select()
    .from(pinMaps)
    .where(and(eq(pinMaps.projectId, projectId), eq(pinMaps.id, id)))
    .for('update');
  return row as PinMapRecord | undefined;
}

export async function findExisting(db: DbOrTx, projectId: number, boardRevisionId: number, partId: number) {
  const [row] = await db
    .select({ id: pinMaps.id })
    .from(pinMaps)
    .where(
      and(eq(pinMaps.projectId, projectId), eq(pinMaps.boardRevisionId, boardRevisionId), eq(pinMaps.partId, partId)),
    );
  return row;
}

export async function findBoard(db: DbOrTx, projectId: number, boardRevisionId: number) {
  const [row] = await db
    .select({ id: boardRevisions.id, label: boardRevisions.label })
    .from(boardRevisions)
    .where(and(eq(boardRevisions.projectId, projectId), eq(boardRevisions.id, boardRevisionId)));
  return row;
}
