/**
 * RC debounce helper: how long a switch's RC filter takes to cross the receiver's thresholds.
 *
 * Equations (Lessons in Electric Circuits, EE Reference ch. 1, time-constant equations):
 * τ = R·C; charging from 0 V, V(t) = V·(1 − e^(−t/RC)), so the time to reach Vth is
 * t = −RC·ln(1 − Vth/V); discharging from V, t = −RC·ln(Vth/V); cutoff f_c = 1/(2πRC).
 * Worked example: TI "Debounce a Switch" (SCEA094, Oct 2020), 10 kΩ with 0.1 µF gives τ = 1 ms.
 */
import { describeThreshold, thresholdAt, type Threshold } from '../contracts/parts';

export function timeConstant(ohms: number, farads: number): number {
  positive(ohms, 'R');
  positive(farads, 'C');
  return ohms * farads;
}

export function cutoffFrequency(ohms: number, farads: number): number {
  return 1 / (2 * Math.PI * timeConstant(ohms, farads));
}

/** Seconds for a capacitor charging from 0 V towards `supplyVolts` to reach `thresholdVolts`. */
export function chargeTime(ohms: number, farads: number, supplyVolts: number, thresholdVolts: number): number {
  const ratio = within(supplyVolts, thresholdVolts);
  return -timeConstant(ohms, farads) * Math.log(1 - ratio);
}

/** Seconds for a capacitor discharging from `supplyVolts` towards 0 V to fall to `thresholdVolts`. */
export function dischargeTime(ohms: number, farads: number, supplyVolts: number, thresholdVolts: number): number {
  const ratio = within(supplyVolts, thresholdVolts);
  return -timeConstant(ohms, farads) * Math.log(ratio);
}

export interface RcDebounceInput {
  ohms: number;
  farads: number;
  supplyVolts: number;
  /** The receiver's VIH and VIL, as its datasheet states them (absolute or relative to its supply). */
  vih: Threshold;
  vil: Threshold;
}

export interface RcDebounceResult {
  tauSeconds: number;
  cutoffHertz: number;
  vihVolts: number;
  vilVolts: number;
  /** Time after release (charging through R) until the input reads high. */
  riseToVihSeconds: number;
  /** Time after press (discharging) until the input reads low. */
  fallToVilSeconds: number;
  /** The equations with the numbers filled in, for display. */
  working: string[];
}

/**
 * The filter's timing against the receiver's thresholds. Thresholds are guaranteed limits, so the
 * real crossing is at or before these times; a Schmitt-trigger input is the usual partner (common
 * practice), since a slow edge between VIL and VIH is otherwise read unpredictably.
 */
export function rcDebounce(input: RcDebounceInput): RcDebounceResult {
  const { ohms, farads, supplyVolts } = input;
  const vihVolts = thresholdAt(input.vih, supplyVolts);
  const vilVolts = thresholdAt(input.vil, supplyVolts);
  const tauSeconds = timeConstant(ohms, farads);
  const riseToVihSeconds = chargeTime(ohms, farads, supplyVolts, vihVolts);
  const fallToVilSeconds = dischargeTime(ohms, farads, supplyVolts, vilVolts);
  const cutoffHertz = cutoffFrequency(ohms, farads);
  return {
    tauSeconds,
    cutoffHertz,
    vihVolts,
    vilVolts,
    riseToVihSeconds,
    fallToVilSeconds,
    working: [
      `τ = R·C = ${ohms} Ω × ${farads} F = ${tauSeconds} s`,
      `f_c = 1/(2π·τ) = ${cutoffHertz} Hz`,
      `rise to VIH (${describeThreshold(input.vih)} = ${vihVolts} V): t = −τ·ln(1 − ${vihVolts}/${supplyVolts}) = ${riseToVihSeconds} s`,
      `fall to VIL (${describeThreshold(input.vil)} = ${vilVolts} V): t = −τ·ln(${vilVolts}/${supplyVolts}) = ${fallToVilSeconds} s`,
    ],
  };
}

function positive(value: number, name: string): void {
  if (!(Number.isFinite(value) && value > 0)) throw new RangeError(`${name} must be a positive number`);
}

function within(supplyVolts: number, thresholdVolts: number): number {
  positive(supplyVolts, 'the supply');
  if (!(thresholdVolts > 0 && thresholdVolts < supplyVolts)) {
    // Outside (0, V) the exponential never reaches the threshold.
    throw new RangeError(
      `the threshold must lie between 0 V and the supply (${supplyVolts} V), got ${thresholdVolts} V`,
    );
  }
  return thresholdVolts / supplyVolts;
}
