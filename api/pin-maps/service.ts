/**
 * Pin maps: per project, board revision and part, which pin carries which signal and what the
 * signal needs of it. Every save is a revision (subject 'pin_map', fields: supplyVolts and rows)
 * in the transaction that writes the map. A save names the revision it was based on; a save on
 * an older one is refused with 409 `edit_conflict` and the current rows (pin maps are tables:
 * a row-by-row merge could pair a pin with the wrong signal, so the editor decides).
 */
import { eq } from 'drizzle-orm';
import type { PinCheckResult, PinMap, PinMapCreate, PinMapList, PinMapUpdate } from '../../shared/contracts/checks';
import type { PinMapRow } from '../../shared/contracts/parts';
import type { EditConflict } from '../../shared/contracts/projects';
import type { ProjectRole } from '../../shared/domain';
import { checkPinMap } from '../../shared/checks/pins';
import { pinMaps, revisions } from '../../db/schema';
import type { Tx } from '../../db/client';
import type { AppContext } from '../context';
import { AppError, fail, isUniqueViolation } from '../http/errors';
import type { AuthUser } from '../http/routes';
import { findPartById, findPartBySlug } from '../parts/queries';
import type { ProjectRow } from '../projects/queries';
import { touchProject } from '../projects/queries';
import { contentHash } from '../revisions/versioned';
import * as q from './queries';

const UNIQUE_KEY = 'pin_maps_board_part_key';

interface StoredFields {
  [key: string]: string | string[];
  supplyVolts: string;
  /** One JSON row per entry, so the revision content stays a list of strings. */
  rows: string[];
}

const toFields = (supplyVolts: number | null, rows: PinMapRow[]): StoredFields => ({
  supplyVolts: supplyVolts === null ? '' : String(supplyVolts),
  rows: rows.map((row) => JSON.stringify(row)),
});

const volts = (stored: string | null) => (stored === null || stored === '' ? null : Number(stored));

function present(view: q.PinMapView): PinMap {
  return {
    id: view.id,
    boardRevision: { id: view.boardRevisionId, label: view.boardLabel },
    part: { slug: view.partSlug, name: view.partName },
    supplyVolts: volts(view.supplyVolts),
    rows: view.rows,
    revision: view.currentRevision,
    updatedAt: view.updatedAt.toISOString(),
  };
}

async function load(ctx: AppContext | { db: Tx }, project: ProjectRow, id: number): Promise<q.PinMapView> {
  const view = await q.findPinMap(ctx.db, project.id, id);
  if (!view) throw fail.notFound('The pin map');
  return view;
}

export async function listPinMaps(ctx: AppContext, project: ProjectRow, role: ProjectRole | null): Promise<PinMapList> {
  const rows = await q.listPinMaps(ctx.db, project.id);
  return { items: rows.map(present), viewer: { canEdit: role !== null } };
}

export async function createPinMap(
  ctx: AppContext,
  user: AuthUser,
  project: ProjectRow,
  input: Required<Omit<PinMapCreate, 'supplyVolts'>> & { supplyVolts: number | null },
): Promise<PinMap> {
  const [board, part] = await Promise.all([
    q.findBoard(ctx.db, project.id, input.boardRevisionId),
    findPartBySlug(ctx.db, input.partSlug),
  ]);
  const issues = [
    ...(board ? [] : [{ path: 'boardRevisionId', message: 'not a board revision of this project' }]),
    ...(part ? [] : [{ path: 'partSlug', message: 'not a part in the library' }]),
  ];
  if (!board || !part) throw fail.validation('Some values do not fit this project.', { issues });
  const exists = () =>
    new AppError('pin_map_exists', `${board.label} already has a pin map for the ${part.name}: edit that one instead.`);
  if (await q.findExisting(ctx.db, project.id, board.id, part.id)) throw exists();
  let id: number;
  try {
    id = await ctx.db.transaction(async (tx) => {
      const [row] = await tx
        .insert(pinMaps)
        .values({
          projectId: project.id,
          boardRevisionId: board.id,
          partId: part.id,
          supplyVolts: input.supplyVolts === null ? null : String(input.supplyVolts),
          rows: input.rows,
          currentRevision: 1,
        })
        .returning({ id: pinMaps.id });
      const fields = toFields(input.supplyVolts, input.rows);
      await tx.insert(revisions).values({
        subject: 'pin_map',
        subjectId: row!.id,
        projectId: project.id,
        number: 1,
        parentNumber: null,
        authorId: user.id,
        message: `Pin map of the ${part.name} on ${board.label}`,
        fields,
        contentHash: contentHash(fields),
        origin: 'create',
      });
      await touchProject(tx, project.id);
      return row!.id;
    });
  } catch (error) {
    // Two editors creating the same map at once: the unique key decides.
    if (isUniqueViolation(error, UNIQUE_KEY)) throw exists();
    throw error;
  }
  return present(await load(ctx, project, id));
}

export async function updatePinMap(
  ctx: AppContext,
  user: AuthUser,
  project: ProjectRow,
  id: number,
  input: PinMapUpdate & { supplyVolts: number | null; rows: PinMapRow[] },
): Promise<PinMap> {
  await ctx.db.transaction(async (tx) => {
    const current = await q.lockPinMap(tx, project.id, id);
    if (!current) throw fail.notFound('The pin map');
    if (input.baseRevision > current.currentRevision) {
      throw fail.validation(
        `Revision ${input.baseRevision} does not exist yet (latest is ${current.currentRevision}).`,
        { issues: [{ path: 'baseRevision', message: 'newer than the latest revision' }] },
      );
    }
    if (input.baseRevision < current.currentRevision) {
      const details: EditConflict = {
        baseRevision: input.baseRevision,
        current: {
          revision: current.currentRevision,
          fields: { supplyVolts: volts(current.supplyVolts), rows: current.rows },
          author: null,
          createdAt: current.updatedAt.toISOString(),
        },
        chunks: {},
        fieldConflicts: [{ field: 'rows', base: null, ours: input.rows, theirs: current.rows }],
        merged: {},
      };
      throw new AppError(
        'edit_conflict',
        `Someone saved revision ${current.currentRevision} of this pin map while you were editing revision ${input.baseRevision}. Compare the rows and save again.`,
        details,
      );
    }
    const fields = toFields(input.supplyVolts, input.rows);
    if (contentHash(fields) === contentHash(toFields(volts(current.supplyVolts), current.rows))) return;
    const number = current.currentRevision + 1;
    await tx
      .update(pinMaps)
      .set({
        supplyVolts: input.supplyVolts === null ? null : String(input.supplyVolts),
        rows: input.rows,
        currentRevision: number,
        updatedAt: new Date(),
      })
      .where(eq(pinMaps.id, current.id));
    await tx.insert(revisions).values({
      subject: 'pin_map',
      subjectId: current.id,
      projectId: project.id,
      number,
      parentNumber: current.currentRevision,
      authorId: user.id,
      message: 'Edited the pin map',
      fields,
      contentHash: contentHash(fields),
      origin: 'edit',
    });
    await touchProject(tx, project.id);
  });
  return present(await load(ctx, project, id));
}

export async function deletePinMap(ctx: AppContext, project: ProjectRow, id: number): Promise<void> {
  await ctx.db.transaction(async (tx) => {
    const current = await q.lockPinMap(tx, project.id, id);
    if (!current) throw fail.notFound('The pin map');
    // Its revisions stay: the history is append-only.
    await tx.delete(pinMaps).where(eq(pinMaps.id, current.id));
    await touchProject(tx, project.id);
  });
}

export async function checkProjectPinMap(ctx: AppContext, project: ProjectRow, id: number): Promise<PinCheckResult> {
  const view = await load(ctx, project, id);
  const part = await findPartById(ctx.db, view.partId);
  if (!part) throw fail.notFound('The part');
  const supplyVolts = volts(view.supplyVolts) ?? part.profile.supply.nominalVolts;
  return {
    pinMapId: view.id,
    part: { slug: part.slug, name: part.name },
    supplyVolts,
    findings: checkPinMap(part.profile, view.rows, { supplyVolts }),
  };
}
