/**
 * The memory budget: firmware builds with the GNU `size` report they were measured with. A
 * build keeps the report text as pasted and the parsed entry of its firmware file; flash and RAM
 * use follow the part's architecture (shared/checks/size-report.ts `memoryUse`: for AVR the
 * avr-libc rule, flash = .text + .data and RAM = .data + .bss). Percentages, warnings and deltas
 * are worked out when the list is read, so a new warn threshold or a corrected part capacity
 * shows on every build at once.
 */
import type { BuildCreate, BuildList, BuildSettings, FirmwareBuild } from '../../shared/contracts/checks';
import {
  memoryUse,
  parseSizeReport,
  SizeReportError,
  type MemoryUse,
  type ParsedSizeReport,
} from '../../shared/checks/size-report';
import type { PartProfile } from '../../shared/contracts/parts';
import type { ProjectRole } from '../../shared/domain';
import type { AppContext } from '../context';
import { AppError, fail } from '../http/errors';
import type { AuthUser } from '../http/routes';
import { architectureOf } from '../parts/architecture';
import { findPartBySlug } from '../parts/queries';
import type { ProjectRow } from '../projects/queries';
import { touchProject } from '../projects/queries';
import * as q from './queries';

function capacitiesOf(profile: PartProfile) {
  const memory = profile.memory;
  if (!memory?.flash) return undefined;
  return {
    flashBytes: memory.flash.bytes,
    ramBytes: memory.sram.bytes,
    ...(memory.eeprom ? { eepromBytes: memory.eeprom.bytes } : {}),
  };
}

function measure(
  parsed: ParsedSizeReport,
  part: { slug: string; name: string; profile: PartProfile },
  options: { bootloaderBytes: number; warnAtPercent: number; filename?: string },
): MemoryUse {
  const capacities = capacitiesOf(part.profile);
  if (!capacities) {
    throw fail.validation(`The ${part.name} profile states no flash size, so its builds cannot be budgeted.`, {
      issues: [{ path: 'partSlug', message: 'the part has no flash capacity in its profile' }],
    });
  }
  try {
    return memoryUse(parsed, { architecture: architectureOf(part), capacities, ...options });
  } catch (error) {
    if (error instanceof SizeReportError) {
      throw new AppError('size_report_invalid', error.message, { line: error.line ?? null });
    }
    if (error instanceof RangeError) {
      throw fail.validation(
        `The bootloader cannot take ${options.bootloaderBytes} bytes of the ${part.name}'s flash.`,
        {
          issues: [{ path: 'bootloaderBytes', message: error.message }],
        },
      );
    }
    throw error;
  }
}

const finite = (n: number) => (Number.isFinite(n) ? Math.round(n * 100) / 100 : 0);

export async function listBuilds(ctx: AppContext, project: ProjectRow, role: ProjectRole | null): Promise<BuildList> {
  const [rows, warnAtPercent] = await Promise.all([
    q.listBuilds(ctx.db, project.id),
    q.warnPercent(ctx.db, project.id),
  ]);
  let previous: { flash: number; ram: number } | null = null;
  const items: FirmwareBuild[] = rows.map((row) => {
    const b = row.build;
    const part =
      row.partSlug !== null && row.partName !== null && row.partProfile !== null
        ? { slug: row.partSlug, name: row.partName, profile: row.partProfile }
        : null;
    let use: MemoryUse | null = null;
    if (part && capacitiesOf(part.profile)) {
      try {
        use = measure(row.sections, part, { bootloaderBytes: b.bootloaderBytes, warnAtPercent });
      } catch {
        use = null; // a profile corrected since: fall back to what was measured when it was added
      }
    }
    const flashUsed = use?.flashUsed ?? b.flashUsed;
    const ramUsed = use?.ramUsed ?? b.ramUsed;
    const item: FirmwareBuild = {
      id: b.id,
      label: b.label,
      builtOn: b.builtOn,
      changeNote: b.changeNote,
      part: part ? { slug: part.slug, name: part.name } : null,
      reportFormat: b.reportFormat as FirmwareBuild['reportFormat'],
      reportText: b.reportText,
      flashUsed,
      ramUsed,
      flashAvailable: use?.flashAvailable ?? 0,
      ramAvailable: use?.ramAvailable ?? 0,
      flashPercent: use ? finite(use.flashPercent) : 0,
      ramPercent: use ? finite(use.ramPercent) : 0,
      bootloaderBytes: b.bootloaderBytes,
      rule: use?.rule ?? 'The part of this build has no memory capacities: only the measured bytes are shown.',
      assumptions: use?.assumptions ?? [],
      flashDelta: previous ? flashUsed - previous.flash : null,
      ramDelta: previous ? ramUsed - previous.ram : null,
      warnings: { flash: use?.warnings.flash ?? false, ram: use?.warnings.ram ?? false },
      createdAt: b.createdAt.toISOString(),
    };
    previous = { flash: flashUsed, ram: ramUsed };
    return item;
  });
  return { items, warnAtPercent, viewer: { canEdit: role !== null } };
}

export async function createBuild(
  ctx: AppContext,
  user: AuthUser,
  project: ProjectRow,
  role: ProjectRole | null,
  input: Omit<BuildCreate, 'builtOn' | 'changeNote' | 'bootloaderBytes'> & {
    builtOn: string | null;
    changeNote: string;
    bootloaderBytes: number;
  },
): Promise<FirmwareBuild> {
  const part = await findPartBySlug(ctx.db, input.partSlug);
  if (!part) {
    throw fail.validation('That part is not in the library.', {
      issues: [{ path: 'partSlug', message: 'not a part in the library' }],
    });
  }
  let parsed: ParsedSizeReport;
  try {
    parsed = parseSizeReport(input.reportText);
  } catch (error) {
    if (error instanceof SizeReportError) {
      throw new AppError('size_report_invalid', error.message, { line: error.line ?? null });
    }
    throw error;
  }
  const warnAtPercent = await q.warnPercent(ctx.db, project.id);
  const use = measure(parsed, part, {
    bootloaderBytes: input.bootloaderBytes,
    warnAtPercent,
    ...(input.filename !== undefined ? { filename: input.filename } : {}),
  });
  // Keep only the firmware's entry, so the build reads back without naming the file again.
  const entry = parsed.entries.find((e) => e.filename === use.filename)!;
  const stored: ParsedSizeReport = { format: parsed.format, entries: [entry] };
  const id = await ctx.db.transaction(async (tx) => {
    const buildId = await q.insertBuild(tx, {
      projectId: project.id,
      partId: part.id,
      label: input.label,
      builtOn: input.builtOn ?? new Date().toISOString().slice(0, 10),
      changeNote: input.changeNote,
      reportFormat: parsed.format,
      reportText: input.reportText,
      sections: stored,
      flashUsed: use.flashUsed,
      ramUsed: use.ramUsed,
      bootloaderBytes: input.bootloaderBytes,
      createdBy: user.id,
    });
    await touchProject(tx, project.id);
    return buildId;
  });
  const list = await listBuilds(ctx, project, role);
  return list.items.find((b) => b.id === id)!;
}

export async function deleteBuild(ctx: AppContext, project: ProjectRow, id: number): Promise<void> {
  await ctx.db.transaction(async (tx) => {
    if (!(await q.deleteBuild(tx, project.id, id))) throw fail.notFound('The build');
    await touchProject(tx, project.id);
  });
}

export async function saveSettings(
  ctx: AppContext,
  project: ProjectRow,
  role: ProjectRole | null,
  settings: BuildSettings,
): Promise<BuildList> {
  await ctx.db.transaction(async (tx) => {
    await q.setWarnPercent(tx, project.id, settings.warnAtPercent);
    await touchProject(tx, project.id);
  });
  return listBuilds(ctx, project, role);
}
