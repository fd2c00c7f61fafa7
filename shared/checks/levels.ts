/**
 * The level check: can this output drive that input, at the supplies actually used?
 *
 * Noise margins use the guaranteed datasheet limits (VOH min, VOL max, VIH min, VIL max), each
 * evaluated at its own part's supply, so a 0.6·VCC threshold at 3.3 V is 1.98 V and not the 3 V of
 * the 5 V row. Output limits are guaranteed only at the stated test current: a heavier load lowers
 * VOH and raises VOL, which the messages say.
 */
import {
  describeThreshold,
  formatSource,
  inputLimitAt,
  roundMillivolts,
  thresholdAt,
  type InputLevelRow,
  type OutputLevelRow,
  type OutputThreshold,
  type PartProfile,
  type SourceRef,
  type SourcedThreshold,
  type SupplyWindow,
  type TestCurrent,
} from '../contracts/parts';

/**
 * Below this a margin that is still positive is called marginal. The number is a judgement
 * (common practice): it is the margin the 5 V TTL family guarantees between its own parts —
 * VOH 2.4 − VIH 2.0 = VIL 0.8 − VOL 0.4 = 0.4 V (TI SN7400) — and a link with less than a
 * same-family TTL link has little room for ground bounce, crosstalk or a long cable.
 */
export const MARGINAL_BELOW_VOLTS = 0.4;
export const marginalThresholdSource: SourceRef = {
  document: 'Trade practice (no single source)',
  section: 'Noise-margin judgement: less than 0.4 V is marginal',
  note: 'Reference point: the margin 5 V TTL parts guarantee each other, 2.4 − 2.0 = 0.8 − 0.4 = 0.4 V (TI SN7400).',
  confidence: 'common_practice',
};

export interface LevelEnd {
  profile: PartProfile;
  supplyVolts: number;
}

export interface LevelCheckInput {
  driver: LevelEnd;
  receiver: LevelEnd;
}

/** One number the check used, with how it was obtained. */
export interface LevelValue {
  volts: number;
  /** How the document states it: "0.6·VCC", "VDD − 0.2 V", "2 V". */
  stated: string;
  /** The supply it was evaluated at. */
  supplyVolts: number;
  /** The supply window of the datasheet row it comes from. */
  specifiedAt: SupplyWindow;
  /** True when the row is specified at another supply than the one used. */
  extrapolated: boolean;
  testCurrent?: TestCurrent;
  source: SourceRef;
}

export type LevelVerdict = 'ok' | 'marginal' | 'fails';

export interface LevelCheckResult {
  verdict: LevelVerdict;
  /** VOH(driver) − VIH(receiver), volts, rounded to 1 mV. */
  noiseMarginHigh: number;
  /** VIL(receiver) − VOL(driver), volts, rounded to 1 mV. */
  noiseMarginLow: number;
  overvoltage: {
    exceeds: boolean;
    /** The receiver's input limit at its supply; null when no limit is on file. */
    limitVolts: number | null;
    /** The driver's high level taken as its supply: a push-pull output can swing to its own rail. */
    drivenVolts: number;
    tolerant: boolean;
    source: SourceRef | null;
  };
  numbers: { voh: LevelValue; vol: LevelValue; vih: LevelValue; vil: LevelValue };
  marginalBelowVolts: number;
  marginalSource: SourceRef;
  messages: string[];
}

/** The part has no row for a number the check needs. */
export class LevelCheckError extends Error {
  override name = 'LevelCheckError';
}

const EPSILON = 1e-9;

function contains(window: SupplyWindow, volts: number): boolean {
  return volts >= window.minVolts - EPSILON && volts <= window.maxVolts + EPSILON;
}

function distance(window: SupplyWindow, volts: number): number {
  return volts < window.minVolts ? window.minVolts - volts : volts - window.maxVolts;
}

/**
 * The datasheet row for a supply. A row whose window holds the supply wins. Otherwise output rows
 * prefer the nearest row at a lower supply — drive weakens as the supply falls, so its limits are
 * the safe side — and input rows take the nearest row; either way the value is marked
 * extrapolated and the verdict can be at best marginal.
 */
function pickRow<T extends { supply: SupplyWindow }>(rows: readonly T[], volts: number, preferLower: boolean) {
  const within = rows.find((row) => contains(row.supply, volts));
  if (within) return { row: within, extrapolated: false };
  const byDistance = [...rows].sort((a, b) => distance(a.supply, volts) - distance(b.supply, volts));
  const lower = byDistance.find((row) => row.supply.maxVolts < volts);
  const row = preferLower && lower ? lower : byDistance[0];
  return row ? { row, extrapolated: true } : undefined;
}

function valueOf(
  threshold: SourcedThreshold | OutputThreshold,
  profile: PartProfile,
  supplyVolts: number,
  window: SupplyWindow,
  extrapolated: boolean,
): LevelValue {
  const testCurrent = 'testCurrent' in threshold ? threshold.testCurrent : undefined;
  return {
    volts: roundMillivolts(thresholdAt(threshold, supplyVolts)),
    stated: describeThreshold(threshold, profile.supply.name),
    supplyVolts,
    specifiedAt: window,
    extrapolated,
    ...(testCurrent ? { testCurrent } : {}),
    source: threshold.source,
  };
}

function windowText(window: SupplyWindow): string {
  return window.minVolts === window.maxVolts ? `${window.minVolts} V` : `${window.minVolts}–${window.maxVolts} V`;
}

/** "ATmega328P at 3.3 V, 0.6·VCC" or "ATmega328P at 5 V, at 20 mA": where a number came from. */
function how(partName: string, supplyVolts: number, value: LevelValue): string {
  const parts = [`${partName} at ${supplyVolts} V`];
  if (value.stated !== `${value.volts} V`) parts.push(value.stated);
  const current = value.testCurrent;
  if (current?.milliamps !== undefined) parts.push(`at ${current.milliamps} mA`);
  else if (current?.description) parts.push(current.description);
  return parts.join(', ');
}

export function checkLevels({ driver, receiver }: LevelCheckInput): LevelCheckResult {
  const out = pickRow<OutputLevelRow>(driver.profile.levels.outputs, driver.supplyVolts, true);
  if (!out) throw new LevelCheckError(`No output levels (VOH/VOL) are on file for the ${driver.profile.name}.`);
  const inp = pickRow<InputLevelRow>(receiver.profile.levels.inputs, receiver.supplyVolts, false);
  if (!inp) throw new LevelCheckError(`No input levels (VIH/VIL) are on file for the ${receiver.profile.name}.`);

  const voh = valueOf(out.row.voh, driver.profile, driver.supplyVolts, out.row.supply, out.extrapolated);
  const vol = valueOf(out.row.vol, driver.profile, driver.supplyVolts, out.row.supply, out.extrapolated);
  const vih = valueOf(inp.row.vih, receiver.profile, receiver.supplyVolts, inp.row.supply, inp.extrapolated);
  const vil = valueOf(inp.row.vil, receiver.profile, receiver.supplyVolts, inp.row.supply, inp.extrapolated);

  const noiseMarginHigh = roundMillivolts(voh.volts - vih.volts);
  const noiseMarginLow = roundMillivolts(vil.volts - vol.volts);
  const messages: string[] = [];
  const d = driver.profile.name;
  const r = receiver.profile.name;

  messages.push(
    `High: VOH ${voh.volts} V (${how(d, driver.supplyVolts, voh)}) − VIH ${vih.volts} V (${how(r, receiver.supplyVolts, vih)}) = ${noiseMarginHigh} V.`,
    `Low: VIL ${vil.volts} V (${how(r, receiver.supplyVolts, vil)}) − VOL ${vol.volts} V (${how(d, driver.supplyVolts, vol)}) = ${noiseMarginLow} V.`,
  );

  let failed = false;
  let marginal = false;
  for (const [label, margin] of [
    ['high', noiseMarginHigh],
    ['low', noiseMarginLow],
  ] as const) {
    if (margin < 0) {
      failed = true;
      messages.push(
        label === 'high'
          ? `The ${d}'s guaranteed high (${voh.volts} V) is below the ${r}'s VIH (${vih.volts} V): a high may be read as low or undefined.`
          : `The ${d}'s guaranteed low (${vol.volts} V) is above the ${r}'s VIL (${vil.volts} V): a low may be read as high or undefined.`,
      );
    } else if (margin < MARGINAL_BELOW_VOLTS) {
      marginal = true;
      messages.push(
        `The ${label} margin of ${margin} V is below ${MARGINAL_BELOW_VOLTS} V: marginal (${formatSource(marginalThresholdSource)}).`,
      );
    }
  }

  for (const [who, value, end] of [
    ['output', voh, driver],
    ['input', vih, receiver],
  ] as const) {
    if (value.extrapolated) {
      marginal = true;
      messages.push(
        `The ${end.profile.name}'s ${who} levels are specified at ${windowText(value.specifiedAt)}, not at ${end.supplyVolts} V; the nearest row is used — check the datasheet for your supply.`,
      );
    }
  }

  for (const end of [driver, receiver]) {
    const { minVolts, maxVolts } = end.profile.supply;
    if (end.supplyVolts < minVolts - EPSILON || end.supplyVolts > maxVolts + EPSILON) {
      failed = true;
      messages.push(
        `${end.supplyVolts} V is outside the ${end.profile.name}'s supply range of ${minVolts}–${maxVolts} V.`,
      );
    }
  }

  const limit = inputLimitAt(receiver.profile, receiver.supplyVolts);
  const drivenVolts = roundMillivolts(driver.supplyVolts);
  const exceeds = limit !== undefined && drivenVolts > limit.maxVolts;
  if (limit === undefined) {
    messages.push(`No input limit is on file for the ${r}: overvoltage was not checked.`);
  } else if (exceeds) {
    failed = true;
    messages.push(
      `A ${driver.supplyVolts} V high from the ${d} exceeds the ${r}'s input limit of ${limit.stated} = ${limit.maxVolts} V at ${receiver.supplyVolts} V` +
        ` (${formatSource(limit.source)}): use a level shifter or a divider.`,
    );
  }

  if (voh.testCurrent || vol.testCurrent) {
    messages.push(
      `VOH and VOL are guaranteed at the datasheet's test current; a heavier load lowers the high and raises the low.`,
    );
  }

  const verdict: LevelVerdict = failed ? 'fails' : marginal ? 'marginal' : 'ok';
  return {
    verdict,
    noiseMarginHigh,
    noiseMarginLow,
    overvoltage: {
      exceeds,
      limitVolts: limit?.maxVolts ?? null,
      drivenVolts,
      tolerant: limit?.tolerant ?? false,
      source: limit?.source ?? null,
    },
    numbers: { voh, vol, vih, vil },
    marginalBelowVolts: MARGINAL_BELOW_VOLTS,
    marginalSource: marginalThresholdSource,
    messages,
  };
}
