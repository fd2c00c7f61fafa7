/**
 * Pin map rows as the table edits them (every cell text, so half-typed values survive) and as
 * the contract carries them, plus how a typed pin resolves through the part's profile.
 */
import {
  pinMapRowSchema,
  type PartPin,
  type PartProfile,
  type PinMapRow,
  type RequiredFunction,
} from '@shared/contracts/parts';
import { resolvePin } from '@shared/checks/pins';
import { requiredFunctionLabels } from '@shared/checks/pin-map-csv';

export interface EditableRow {
  /** Stable across reordering, for Vue's keys and focus. */
  key: number;
  pin: string;
  signal: string;
  function: RequiredFunction;
  /** Volts as typed; empty when the outside circuit does not drive the pin. */
  drivenAt: string;
}

let nextKey = 1;

export function editableRow(row?: Partial<PinMapRow>): EditableRow {
  return {
    key: nextKey++,
    pin: row?.pin ?? '',
    signal: row?.signal ?? '',
    function: row?.function ?? 'digital_out',
    drivenAt: row?.drivenAtVolts === undefined ? '' : String(row.drivenAtVolts),
  };
}

export function editableRows(rows: readonly PinMapRow[]): EditableRow[] {
  return rows.map((row) => editableRow(row));
}

export interface RowProblem {
  index: number;
  field: 'pin' | 'signal' | 'drivenAt';
  message: string;
}

/** "3.3", "3,3", "3.3 V" → 3.3; "" → undefined; anything else → NaN. */
function volts(text: string): number | undefined {
  const value = text.trim().replace(/\s*v$/i, '');
  if (value === '') return undefined;
  return /^[-+]?\d+(?:[.,]\d+)?$/.test(value) ? Number(value.replace(',', '.')) : Number.NaN;
}

/** The rows as the contract takes them, or what stops each bad row (by table position). */
export function contractRows(rows: readonly EditableRow[]): { rows: PinMapRow[]; problems: RowProblem[] } {
  const out: PinMapRow[] = [];
  const problems: RowProblem[] = [];
  rows.forEach((row, index) => {
    const drivenAtVolts = volts(row.drivenAt);
    if (drivenAtVolts !== undefined && Number.isNaN(drivenAtVolts)) {
      problems.push({ index, field: 'drivenAt', message: `“${row.drivenAt}” is not a voltage` });
      return;
    }
    const parsed = pinMapRowSchema.safeParse({
      pin: row.pin,
      signal: row.signal,
      function: row.function,
      ...(drivenAtVolts !== undefined ? { drivenAtVolts } : {}),
    });
    if (parsed.success) out.push(parsed.data);
    else {
      const path = parsed.error.issues[0]?.path[0];
      const field = path === 'pin' || path === 'signal' ? path : 'drivenAt';
      const what = { pin: 'The pin', signal: 'The signal', drivenAt: 'The voltage' }[field];
      const empty = field !== 'drivenAt' && row[field].trim() === '';
      const tooLong = field !== 'drivenAt' && !empty;
      const message = empty ? `${what} is empty` : tooLong ? `${what} is too long` : `${what} is out of range (±50 V)`;
      problems.push({ index, field, message });
    }
  });
  return { rows: out, problems };
}

/** The same rows, compared cell by cell (to know whether anything is unsaved). */
export function sameRows(a: readonly PinMapRow[], b: readonly PinMapRow[]): boolean {
  return (
    a.length === b.length &&
    a.every(
      (row, i) =>
        row.pin === b[i]!.pin &&
        row.signal === b[i]!.signal &&
        row.function === b[i]!.function &&
        row.drivenAtVolts === b[i]!.drivenAtVolts,
    )
  );
}

export function functionLabel(fn: RequiredFunction): string {
  return requiredFunctionLabels[fn];
}

export interface PinResolution {
  pin: PartPin | undefined;
  /** "D7 → PD7, pin 11", or why nothing matched. */
  text: string;
}

/** How a typed label resolves: the pin's other names and its package pin. */
export function describePin(profile: PartProfile, typed: string): PinResolution | null {
  const label = typed.trim();
  if (label === '') return null;
  const pin = resolvePin(profile, label);
  if (!pin) return { pin: undefined, text: `The ${profile.name} has no pin “${label}”` };
  const same = (other: string) =>
    other.toUpperCase().replace(/[\s_-]+/g, '') === label.toUpperCase().replace(/[\s_-]+/g, '');
  const names = [pin.board, pin.port ?? pin.name].filter((n): n is string => n !== undefined && !same(n));
  const unique = [...new Set(names)];
  const packagePin = pin.packagePin ? `pin ${pin.packagePin.number}` : undefined;
  const parts = [...unique, ...(packagePin && !same(packagePin) ? [packagePin] : [])];
  return { pin, text: parts.length > 0 ? `${label} → ${parts.join(', ')}` : label };
}
