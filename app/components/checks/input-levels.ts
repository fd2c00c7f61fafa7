/**
 * The receiver's input thresholds at a supply, for the RC debounce helper: the DC-characteristics
 * row whose supply window holds the supply, else the nearest row (marked `extrapolated`), the same
 * choice the level check makes for inputs (shared/checks/levels.ts).
 */
import type { InputLevelRow, PartProfile } from '@shared/contracts/parts';

export interface InputRowAt {
  row: InputLevelRow;
  /** True when no row's window holds the supply and the nearest one is used. */
  extrapolated: boolean;
}

const EPSILON = 1e-9;

function distance(row: InputLevelRow, volts: number): number {
  if (volts < row.supply.minVolts - EPSILON) return row.supply.minVolts - volts;
  if (volts > row.supply.maxVolts + EPSILON) return volts - row.supply.maxVolts;
  return 0;
}

export function inputRowAt(profile: PartProfile, supplyVolts: number): InputRowAt | null {
  const rows = profile.levels.inputs;
  if (rows.length === 0) return null;
  let best = rows[0]!;
  for (const row of rows) if (distance(row, supplyVolts) < distance(best, supplyVolts)) best = row;
  return { row: best, extrapolated: distance(best, supplyVolts) > 0 };
}
