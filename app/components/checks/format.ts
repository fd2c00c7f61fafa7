/** Numbers as the checks show them: a few significant digits and a unit a reader expects. */

function sig(value: number, digits = 4): string {
  return Number(value.toPrecision(digits)).toString();
}

/** 0.001204 → "1.204 ms"; 2.5e-5 → "25 µs"; 1.5 → "1.5 s". */
export function formatSeconds(seconds: number): string {
  const abs = Math.abs(seconds);
  if (abs >= 1) return `${sig(seconds)} s`;
  if (abs >= 1e-3) return `${sig(seconds * 1e3)} ms`;
  if (abs >= 1e-6) return `${sig(seconds * 1e6)} µs`;
  return `${sig(seconds * 1e9)} ns`;
}

/** 159.15 → "159.2 Hz"; 15915 → "15.92 kHz". */
export function formatHertz(hertz: number): string {
  const abs = Math.abs(hertz);
  if (abs >= 1e6) return `${sig(hertz / 1e6)} MHz`;
  if (abs >= 1e3) return `${sig(hertz / 1e3)} kHz`;
  return `${sig(hertz)} Hz`;
}

/** Volts to the millivolt, signed when asked: "+0.45 V", "−0.05 V". */
export function formatVolts(volts: number, signed = false): string {
  const rounded = Math.round(volts * 1000) / 1000;
  const text = `${Math.abs(rounded)} V`;
  if (rounded < 0) return `−${text}`;
  return signed && rounded > 0 ? `+${text}` : text;
}

export const resistanceUnits = [
  { title: 'Ω', value: 1 },
  { title: 'kΩ', value: 1e3 },
  { title: 'MΩ', value: 1e6 },
] as const;

export const capacitanceUnits = [
  { title: 'pF', value: 1e-12 },
  { title: 'nF', value: 1e-9 },
  { title: 'µF', value: 1e-6 },
] as const;

/** A typed number: accepts a comma as decimal mark; null when it is not a finite number. */
export function parseNumber(text: string | number | null | undefined): number | null {
  if (typeof text === 'number') return Number.isFinite(text) ? text : null;
  if (text === null || text === undefined) return null;
  const cleaned = text.trim().replace(',', '.');
  if (cleaned === '') return null;
  const value = Number(cleaned);
  return Number.isFinite(value) ? value : null;
}
