/**
 * The pin check: a project's pin map against the part's pin profile.
 *
 * Findings are an aid, not a verdict on the design: each one cites the profile value it relies on
 * so the maker can open the datasheet section and judge. The check assumes the part is the bus
 * controller (SPI SS and SCK are outputs), which is how makers wire the boards these profiles
 * describe.
 */
import type { Severity, startingCategories } from '../domain';
import {
  capabilitySource,
  formatSource,
  hasCapability,
  inputLimitAt,
  normaliseLabel,
  pinDisplayName,
  pinLabels,
  roundMillivolts,
  type PartPin,
  type PartProfile,
  type PinCapability,
  type PinMapRow,
  type RequiredFunction,
  type SourceRef,
} from '../contracts/parts';

export const pinFindingCodes = [
  'unknown_pin',
  'pin_used_twice',
  'analog_only',
  'input_only',
  'no_interrupt',
  'function_not_supported',
  'software_bus',
  'strapping_pin',
  'flash_pin',
  'over_voltage',
  'under_voltage',
] as const;
export type PinFindingCode = (typeof pinFindingCodes)[number];

export interface PinFinding {
  severity: 'error' | 'warning';
  code: PinFindingCode;
  /** The pin map rows the finding is about (two or more for a pin used twice). */
  rowIndexes: number[];
  /** The pin as the part names it ("D7 (PD7)"), or as written when the part has no such pin. */
  pin: string;
  message: string;
  suggestion?: string;
  /** Pins that do have the required function, nearest first in board order. */
  nearest?: string[];
  source: SourceRef;
}

export interface PinCheckOptions {
  /** The part's supply in this design; defaults to the profile's nominal supply. */
  supplyVolts?: number;
}

const OUTPUT_FUNCTIONS: ReadonlySet<RequiredFunction> = new Set([
  'digital_out',
  'pwm',
  'uart_tx',
  'spi_mosi',
  'spi_sck',
  'spi_ss',
  // I²C lines are open-drain outputs: an input-only pin cannot pull them low.
  'i2c_sda',
  'i2c_scl',
]);
const BUS_FUNCTIONS: ReadonlySet<RequiredFunction> = new Set([
  'i2c_sda',
  'i2c_scl',
  'spi_mosi',
  'spi_miso',
  'spi_sck',
  'spi_ss',
  'uart_tx',
  'uart_rx',
]);
const INTERRUPT_FUNCTIONS: ReadonlySet<RequiredFunction> = new Set(['ext_interrupt', 'pin_change_interrupt']);
const NEAREST_LIMIT = 3;

const functionNames: Record<RequiredFunction, string> = {
  digital_in: 'a digital input',
  digital_out: 'a digital output',
  analog_in: 'an analog input',
  pwm: 'hardware PWM',
  ext_interrupt: 'an external interrupt',
  pin_change_interrupt: 'a pin-change interrupt',
  i2c_sda: 'I²C SDA',
  i2c_scl: 'I²C SCL',
  spi_mosi: 'SPI MOSI',
  spi_miso: 'SPI MISO',
  spi_sck: 'SPI SCK',
  spi_ss: 'SPI SS',
  uart_tx: 'UART TX',
  uart_rx: 'UART RX',
};

function busName(fn: RequiredFunction): string {
  if (fn.startsWith('i2c')) return 'I²C';
  if (fn.startsWith('spi')) return 'SPI';
  return 'UART';
}

/** Digits compare as numbers: "GPIO05" = "GPIO5", "D07" = "D7". */
function canonical(label: string): string {
  return normaliseLabel(label).replace(/^([A-Z]*)0+(?=\d)/, '$1');
}

// People write the same RP2040/ESP32 pin as GPIO26, GP26 or IO26.
const GPIO_SPELLINGS = ['GPIO', 'GP', 'IO'];

/**
 * The part's pin for a label as a maker writes it: board label ("D7", "A6", "GP26"), port pin
 * ("PD7", "GPIO35", "IO35"), a number firmware uses ("7"), or a package pin as "pin 11" / "#11".
 * Case, spaces, hyphens, underscores and leading zeros do not matter.
 */
export function resolvePin(profile: PartProfile, label: string): PartPin | undefined {
  const key = canonical(label);
  if (key === '') return undefined;
  const packagePin = /^(?:PIN|#)(\d+)$/.exec(key);
  if (packagePin) {
    return profile.pins.find((pin) => pin.packagePin && Number(pin.packagePin.number) === Number(packagePin[1]));
  }
  const byLabel = (wanted: string) => profile.pins.find((pin) => pinLabels(pin).some((l) => canonical(l) === wanted));
  const direct = byLabel(key);
  if (direct) return direct;
  const spelled = /^(GPIO|GP|IO)(\d+)$/.exec(key);
  if (spelled) {
    for (const prefix of GPIO_SPELLINGS) {
      const found = prefix === spelled[1] ? undefined : byLabel(`${prefix}${spelled[2]}`);
      if (found) return found;
    }
  }
  return undefined;
}

/** Pins with the function, nearest to `from` in board order, skipping flash pins and pins in use. */
function nearestWith(profile: PartProfile, from: PartPin, fn: PinCapability, inUse: ReadonlySet<string>): string[] {
  const origin = profile.pins.indexOf(from);
  return profile.pins
    .map((pin, index) => ({ pin, distance: Math.abs(index - origin), index }))
    .filter(
      ({ pin }) =>
        pin !== from && hasCapability(pin, fn) && !hasCapability(pin, 'reserved_flash') && !inUse.has(pin.name),
    )
    .sort((a, b) => a.distance - b.distance || a.index - b.index)
    .slice(0, NEAREST_LIMIT)
    .map(({ pin }) => pinDisplayName(pin));
}

function listNames(names: string[]): string {
  if (names.length <= 1) return names.join('');
  return `${names.slice(0, -1).join(', ')} or ${names.at(-1)}`;
}

function moveTo(nearest: string[], what: string): string | undefined {
  return nearest.length > 0
    ? `Move the signal to ${listNames(nearest)}, which ${nearest.length > 1 ? 'have' : 'has'} ${what}.`
    : undefined;
}

function functionFindings(
  profile: PartProfile,
  pin: PartPin,
  row: PinMapRow,
  index: number,
  inUse: ReadonlySet<string>,
): PinFinding[] {
  const fn = row.function;
  if (hasCapability(pin, fn)) return [];
  const name = pinDisplayName(pin);
  const base = { rowIndexes: [index], pin: name };
  const what = functionNames[fn];
  const nearest = nearestWith(profile, pin, fn, inUse);
  const withNearest = nearest.length > 0 ? { nearest, suggestion: moveTo(nearest, what) } : {};
  const analogOnly = hasCapability(pin, 'analog_in') && !hasCapability(pin, 'digital_in');

  if (OUTPUT_FUNCTIONS.has(fn) && !hasCapability(pin, 'digital_out')) {
    if (hasCapability(pin, 'input_only')) {
      return [
        {
          ...base,
          ...withNearest,
          severity: 'error',
          code: 'input_only',
          message: `${name} is input only: it cannot drive ${row.signal} as ${what}.`,
          source: capabilitySource(pin, 'input_only'),
        },
      ];
    }
    if (analogOnly) {
      return [
        {
          ...base,
          ...withNearest,
          severity: 'error',
          code: 'analog_only',
          message: `${name} is an analog input only (no digital I/O): it cannot drive ${row.signal} as ${what}.`,
          source: pin.source,
        },
      ];
    }
  }

  if (INTERRUPT_FUNCTIONS.has(fn)) {
    const other: RequiredFunction = fn === 'ext_interrupt' ? 'pin_change_interrupt' : 'ext_interrupt';
    const otherDetail = pin.capabilities.find((c) => c.function === other)?.detail;
    const alternative = hasCapability(pin, other)
      ? ` ${name} does have ${functionNames[other]}${otherDetail ? ` (${otherDetail})` : ''}, if the firmware can use that instead.`
      : '';
    const suggestion = [moveTo(nearest, what), alternative.trim()].filter(Boolean).join(' ');
    return [
      {
        ...base,
        severity: 'error',
        code: 'no_interrupt',
        message: `${name} has no ${what.replace(/^an? /, '')}${analogOnly ? ' (it is an analog input only)' : ''}: ${row.signal} will not trigger one.`,
        ...(nearest.length > 0 ? { nearest } : {}),
        ...(suggestion ? { suggestion } : {}),
        source: pin.source,
      },
    ];
  }

  const needsDigital = fn !== 'analog_in';
  if (needsDigital && !hasCapability(pin, 'digital_in') && !hasCapability(pin, 'digital_out')) {
    return [
      {
        ...base,
        ...withNearest,
        severity: 'error',
        code: analogOnly ? 'analog_only' : 'function_not_supported',
        message: analogOnly
          ? `${name} is an analog input only (no digital I/O, no pull-up): ${row.signal} cannot use it as ${what}.`
          : `${name} has no digital I/O: ${row.signal} cannot use it as ${what}.`,
        source: pin.source,
      },
    ];
  }

  if (BUS_FUNCTIONS.has(fn)) {
    return [
      {
        ...base,
        ...withNearest,
        severity: 'warning',
        code: 'software_bus',
        message: `${name} is not a hardware ${what} pin: ${row.signal} needs a software ${busName(fn)} implementation (slower, and it costs CPU time).`,
        source: pin.source,
      },
    ];
  }

  return [
    {
      ...base,
      ...withNearest,
      severity: 'error',
      code: 'function_not_supported',
      message: `${name} does not offer ${what}: ${row.signal} cannot use it that way.`,
      source: pin.source,
    },
  ];
}

function cautionFindings(pin: PartPin, row: PinMapRow, index: number): PinFinding[] {
  const name = pinDisplayName(pin);
  const findings: PinFinding[] = [];
  for (const entry of pin.capabilities) {
    if (entry.function === 'strapping') {
      findings.push({
        severity: 'warning',
        code: 'strapping_pin',
        rowIndexes: [index],
        pin: name,
        message: `${name} is a strapping pin used by ${row.signal}. ${entry.reason ?? ''}`.trim(),
        suggestion: `Make sure whatever ${row.signal} connects to leaves ${name} at its boot level during reset, or move it to another pin.`,
        source: entry.source ?? pin.source,
      });
    }
    if (entry.function === 'reserved_flash') {
      findings.push({
        severity: 'warning',
        code: 'flash_pin',
        rowIndexes: [index],
        pin: name,
        message: `${name} is used by ${row.signal} but is reserved for flash. ${entry.reason ?? ''}`.trim(),
        suggestion: `Move ${row.signal} to a pin that is not wired to the flash.`,
        source: entry.source ?? pin.source,
      });
    }
  }
  return findings;
}

function voltageFindings(
  profile: PartProfile,
  pin: PartPin,
  row: PinMapRow,
  index: number,
  supplyVolts: number,
): PinFinding[] {
  if (row.drivenAtVolts === undefined) return [];
  const limit = inputLimitAt(profile, supplyVolts, pin);
  if (!limit) return [];
  const name = pinDisplayName(pin);
  const driven = roundMillivolts(row.drivenAtVolts);
  if (driven > limit.maxVolts) {
    return [
      {
        severity: 'error',
        code: 'over_voltage',
        rowIndexes: [index],
        pin: name,
        message:
          `${row.signal} drives ${name} to ${driven} V; the ${profile.name} allows at most ${limit.stated}` +
          (limit.stated === `${limit.maxVolts} V` ? '.' : ` = ${limit.maxVolts} V at a ${supplyVolts} V supply.`),
        suggestion: 'Add a level shifter or a resistor divider, or power the driving circuit from the same supply.',
        source: limit.source,
      },
    ];
  }
  if (limit.minVolts !== undefined && driven < limit.minVolts) {
    return [
      {
        severity: 'error',
        code: 'under_voltage',
        rowIndexes: [index],
        pin: name,
        message: `${row.signal} takes ${name} to ${driven} V, below the ${limit.minVolts} V the ${profile.name} allows.`,
        suggestion: 'Clamp the signal (series resistor and diode to ground) or shift its level.',
        source: limit.source,
      },
    ];
  }
  return [];
}

/** The pin map checked against the part: one finding per problem, in pin map order. */
export function checkPinMap(
  profile: PartProfile,
  rows: readonly PinMapRow[],
  options: PinCheckOptions = {},
): PinFinding[] {
  const supplyVolts = options.supplyVolts ?? profile.supply.nominalVolts;
  const resolved = rows.map((row) => resolvePin(profile, row.pin));
  const inUse = new Set(resolved.filter((p): p is PartPin => p !== undefined).map((p) => p.name));
  const findings: PinFinding[] = [];
  const byPin = new Map<string, number[]>();
  const example = profile.pins[0];
  const examples = example
    ? [example.board, example.port, example.packagePin ? `pin ${example.packagePin.number}` : undefined]
        .filter(Boolean)
        .join(', ')
    : '';

  rows.forEach((row, index) => {
    const pin = resolved[index];
    if (!pin) {
      findings.push({
        severity: 'error',
        code: 'unknown_pin',
        rowIndexes: [index],
        pin: row.pin,
        message: `The ${profile.name} has no pin "${row.pin}" (used by ${row.signal}).`,
        ...(examples ? { suggestion: `Use the part's labels, for example ${examples}.` } : {}),
        source: example?.labelsSource ?? profile.supply.source,
      });
      return;
    }
    byPin.set(pin.name, [...(byPin.get(pin.name) ?? []), index]);
    findings.push(...functionFindings(profile, pin, row, index, inUse));
    findings.push(...cautionFindings(pin, row, index));
    findings.push(...voltageFindings(profile, pin, row, index, supplyVolts));
  });

  for (const [pinName, indexes] of byPin) {
    if (indexes.length < 2) continue;
    const pin = profile.pins.find((p) => p.name === pinName)!;
    const signals = indexes.map((i) => rows[i]!.signal);
    findings.push({
      severity: 'error',
      code: 'pin_used_twice',
      rowIndexes: indexes,
      pin: pinDisplayName(pin),
      message: `${pinDisplayName(pin)} is assigned to ${listNames(signals).replace(' or ', ' and ')}.`,
      suggestion: 'Give each signal its own pin.',
      source: pin.labelsSource,
    });
  }

  return findings.sort((a, b) => a.rowIndexes[0]! - b.rowIndexes[0]!);
}

// ---------------------------------------------------------------------------------------------
// From a finding to an erratum draft

type CategorySlug = (typeof startingCategories)[number]['slug'];
export type PinCheckCategory = Extract<CategorySlug, 'pin-capability' | 'logic-level'>;

export interface ErratumDraft {
  title: string;
  category: PinCheckCategory;
  severity: Severity;
  symptom: string;
  cause: string;
  fix: string;
  location: { parts: string[]; pins: string[] };
}

export interface ErratumDraftContext {
  /** The part as the project names it ("U1 ATmega328P" or just the part name). */
  partName: string;
  /** The pin map the finding came from, for the signal names. */
  rows: readonly PinMapRow[];
}

/**
 * A starting point for an erratum, filled from a finding. The maker edits it before saving;
 * the cause keeps the citation so the record still points at the datasheet afterwards.
 */
export function findingToErratumDraft(finding: PinFinding, context: ErratumDraftContext): ErratumDraft {
  const signals = finding.rowIndexes.map((i) => context.rows[i]?.signal).filter((s): s is string => s !== undefined);
  const signal = signals[0] ?? 'The signal';
  const fnName = (() => {
    const fn = context.rows[finding.rowIndexes[0] ?? -1]?.function;
    return fn ? functionNames[fn] : 'the required function';
  })();
  const pin = finding.pin;
  const electrical = finding.code === 'over_voltage' || finding.code === 'under_voltage';
  const drafts: Record<PinFindingCode, { title: string; symptom: string; fix: string }> = {
    unknown_pin: {
      title: `${signal} is mapped to "${pin}", which the ${context.partName} does not have`,
      symptom: `The pin map names pin "${pin}" for ${signal}, but the part has no such pin.`,
      fix: 'Correct the pin label in the pin map and on the schematic.',
    },
    pin_used_twice: {
      title: `${pin} is shared by ${listNames(signals).replace(' or ', ' and ')}`,
      symptom: `${listNames(signals).replace(' or ', ' and ')} share ${pin}; at most one of them can work.`,
      fix: 'Give each signal its own pin.',
    },
    analog_only: {
      title: `${signal} on ${pin}: analog-input-only pin`,
      symptom: `${signal} does not work: ${pin} cannot act as ${fnName}.`,
      fix: `Move ${signal} to a pin with digital I/O.`,
    },
    input_only: {
      title: `${signal} on ${pin}: input-only pin cannot drive`,
      symptom: `${signal} never changes state: ${pin} cannot output.`,
      fix: `Move ${signal} to an output-capable pin.`,
    },
    no_interrupt: {
      title: `${signal} on ${pin}: no ${fnName.replace(/^an? /, '')}`,
      symptom: `${signal} never triggers its interrupt on ${pin}.`,
      fix: `Move ${signal} to a pin with ${fnName}.`,
    },
    function_not_supported: {
      title: `${signal} on ${pin}: pin lacks ${fnName}`,
      symptom: `${signal} does not work as ${fnName} on ${pin}.`,
      fix: `Move ${signal} to a pin that offers ${fnName}.`,
    },
    software_bus: {
      title: `${signal} on ${pin}: not a hardware ${fnName} pin`,
      symptom: `${signal} needs a software implementation on ${pin}: slower and CPU-bound.`,
      fix: `Move ${signal} to the hardware ${fnName} pin.`,
    },
    strapping_pin: {
      title: `${signal} on strapping pin ${pin}`,
      symptom: `The board can fail to boot, or boot in the wrong mode, when ${signal} holds ${pin} at reset.`,
      fix: `Keep ${pin} at its boot level during reset, or move ${signal}.`,
    },
    flash_pin: {
      title: `${signal} on flash pin ${pin}`,
      symptom: `The module crashes or does not boot while ${signal} uses ${pin}.`,
      fix: `Move ${signal} to a pin that is not wired to the flash.`,
    },
    over_voltage: {
      title: `${pin} driven above its maximum by ${signal}`,
      symptom: `${pin} sees more than its absolute maximum from ${signal}; the input can be damaged or latch up.`,
      fix: 'Add a level shifter or a resistor divider.',
    },
    under_voltage: {
      title: `${pin} driven below its minimum by ${signal}`,
      symptom: `${pin} is taken below its absolute minimum by ${signal}; the input can be damaged or latch up.`,
      fix: 'Clamp the signal or shift its level.',
    },
  };
  const draft = drafts[finding.code];
  const severity: Severity = electrical ? 'critical' : finding.severity === 'error' ? 'major' : 'minor';
  return {
    title: draft.title,
    category: electrical ? 'logic-level' : 'pin-capability',
    severity,
    symptom: draft.symptom,
    cause: `${finding.message} Source: ${formatSource(finding.source)}.`,
    fix: finding.suggestion ?? draft.fix,
    location: { parts: [context.partName], pins: [pin] },
  };
}
