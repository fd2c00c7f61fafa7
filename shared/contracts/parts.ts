/**
 * Part profiles: what a part can do and the electrical numbers the checks rely on, as data.
 *
 * Every value carries the place it was read from, because the pin check, level check and memory
 * budget are aids that must point back to the datasheet section they rely on (DESIGN.md
 * "Cautions"). A value nobody has checked against a document is labelled `from_memory` so the UI
 * can say so instead of presenting it as fact.
 */
import { z } from 'zod';
import { partKinds } from '../domain';
import { slugSchema } from '../text';

/**
 * How much a value can be trusted:
 * - `datasheet`: read from the primary document named in `document` (the part's datasheet, the
 *   vendor's programming guide, the interface standard, or — for board labels — the board
 *   definition itself);
 * - `corroborated`: the primary document was not at hand; the value is confirmed by other vendor
 *   or secondary documents that reproduce it (the note says which);
 * - `from_memory`: not yet checked against any document;
 * - `common_practice`: a trade rule of thumb with no single source.
 */
export const sourceConfidences = ['datasheet', 'corroborated', 'from_memory', 'common_practice'] as const;
export type SourceConfidence = (typeof sourceConfidences)[number];

export const sourceRefSchema = z.strictObject({
  document: z.string().trim().min(1),
  revision: z.string().trim().min(1).optional(),
  /** Section, table or figure, as the document numbers it. */
  section: z.string().trim().min(1),
  note: z.string().trim().min(1).optional(),
  confidence: z.enum(sourceConfidences),
});
export type SourceRef = z.infer<typeof sourceRefSchema>;

/** One line for messages: "ATmega328/P Datasheet Complete DS40001984A, Table 32-2 (datasheet)". */
export function formatSource(source: SourceRef): string {
  const doc = source.revision ? `${source.document} ${source.revision}` : source.document;
  const label = source.confidence.replace('_', ' ');
  return `${doc}, ${source.section} (${label})`;
}

// ---------------------------------------------------------------------------------------------
// Voltages that may depend on the supply

/**
 * Datasheets state thresholds three ways: absolute (VIH ≥ 2.0 V), as a fraction of the supply
 * (VIH ≥ 0.6·VCC) or as an offset from it (VOH ≥ VDD − 0.2 V, pin ≤ VCC + 0.5 V). Keeping the
 * form lets the checks evaluate the value at the supply actually used.
 */
const voltsThreshold = z.strictObject({ kind: z.literal('volts'), volts: z.number().finite() });
const fractionThreshold = z.strictObject({
  kind: z.literal('fraction_of_supply'),
  fraction: z.number().positive().max(1.5),
});
const offsetThreshold = z.strictObject({
  kind: z.literal('supply_offset'),
  /** Added to the supply: −0.2 for "VDD − 0.2 V", +0.5 for "VCC + 0.5 V". */
  offsetVolts: z.number().finite(),
});

export const thresholdSchema = z.discriminatedUnion('kind', [voltsThreshold, fractionThreshold, offsetThreshold]);
export type Threshold = z.infer<typeof thresholdSchema>;

/** The threshold's value at a given supply. */
export function thresholdAt(threshold: Threshold, supplyVolts: number): number {
  switch (threshold.kind) {
    case 'volts':
      return threshold.volts;
    case 'fraction_of_supply':
      return threshold.fraction * supplyVolts;
    case 'supply_offset':
      return supplyVolts + threshold.offsetVolts;
  }
}

/** "0.6·VCC", "VCC − 0.2 V", "2 V": how the datasheet wrote it, for messages. */
export function describeThreshold(threshold: Threshold, supplyName = 'VCC'): string {
  switch (threshold.kind) {
    case 'volts':
      return `${threshold.volts} V`;
    case 'fraction_of_supply':
      return `${threshold.fraction}·${supplyName}`;
    case 'supply_offset':
      return threshold.offsetVolts < 0
        ? `${supplyName} − ${-threshold.offsetVolts} V`
        : `${supplyName} + ${threshold.offsetVolts} V`;
  }
}

const sourced = { source: sourceRefSchema };

export const testCurrentSchema = z.strictObject({
  /** Positive number; whether it is sourced or sunk follows from VOH / VOL. */
  milliamps: z.number().positive().optional(),
  description: z.string().trim().min(1).optional(),
  source: sourceRefSchema,
});
export type TestCurrent = z.infer<typeof testCurrentSchema>;

const sourcedThresholdSchema = z.discriminatedUnion('kind', [
  voltsThreshold.extend(sourced),
  fractionThreshold.extend(sourced),
  offsetThreshold.extend(sourced),
]);
export type SourcedThreshold = z.infer<typeof sourcedThresholdSchema>;

const outputThresholdSchema = z.discriminatedUnion('kind', [
  voltsThreshold.extend({ ...sourced, testCurrent: testCurrentSchema.optional() }),
  fractionThreshold.extend({ ...sourced, testCurrent: testCurrentSchema.optional() }),
  offsetThreshold.extend({ ...sourced, testCurrent: testCurrentSchema.optional() }),
]);
export type OutputThreshold = z.infer<typeof outputThresholdSchema>;

const supplyWindowSchema = z
  .strictObject({ minVolts: z.number().positive(), maxVolts: z.number().positive() })
  .refine((w) => w.minVolts <= w.maxVolts, 'minVolts must not exceed maxVolts');
export type SupplyWindow = z.infer<typeof supplyWindowSchema>;

/** VIH/VIL valid over a supply window (one row of a DC characteristics table). */
export const inputLevelRowSchema = z.strictObject({
  supply: supplyWindowSchema,
  vih: sourcedThresholdSchema,
  vil: sourcedThresholdSchema,
});
export type InputLevelRow = z.infer<typeof inputLevelRowSchema>;

/**
 * VOH/VOL as specified at a supply (often a single value: "at VCC = 5 V") and a test current.
 * Several rows per part are normal: the ATmega328P states 5 V / 20 mA and 3 V / 10 mA.
 */
export const outputLevelRowSchema = z.strictObject({
  supply: supplyWindowSchema,
  voh: outputThresholdSchema,
  vol: outputThresholdSchema,
});
export type OutputLevelRow = z.infer<typeof outputLevelRowSchema>;

/** The most an input pin may see. Absolute-maximum tables state it as "VCC + 0.5 V" or a number. */
export const inputLimitSchema = z.strictObject({
  maxVolts: z.discriminatedUnion('kind', [voltsThreshold, offsetThreshold]),
  minVolts: z.number().finite().optional(),
  fiveVoltTolerant: z.boolean(),
  /** Required when some pin is marked five_volt_tolerant: the limit that applies to those pins. */
  tolerantMaxVolts: z.number().positive().optional(),
  source: sourceRefSchema,
});
export type InputLimit = z.infer<typeof inputLimitSchema>;

// ---------------------------------------------------------------------------------------------
// Memory and speed

const sourcedBytes = z.strictObject({ bytes: z.number().int().positive(), source: sourceRefSchema });

export const bootloaderOptionSchema = z.strictObject({
  name: z.string().trim().min(1),
  reservedBytes: z.number().int().nonnegative(),
  source: sourceRefSchema,
});
export type BootloaderOption = z.infer<typeof bootloaderOptionSchema>;

export const memoryCapacitiesSchema = z.strictObject({
  flash: sourcedBytes.optional(),
  sram: sourcedBytes,
  eeprom: sourcedBytes.optional(),
  bootloaderOptions: z.array(bootloaderOptionSchema).default([]),
});
export type MemoryCapacities = z.infer<typeof memoryCapacitiesSchema>;

export const speedGradeSchema = z.strictObject({
  maxMHz: z.number().positive(),
  minVolts: z.number().positive(),
  maxVolts: z.number().positive(),
  source: sourceRefSchema,
});
export type SpeedGrade = z.infer<typeof speedGradeSchema>;

// ---------------------------------------------------------------------------------------------
// Pins

/** What a pin can do. A closed list: the pin check compares required functions against it. */
export const pinCapabilities = [
  'digital_in',
  'digital_out',
  'analog_in',
  'pwm',
  'ext_interrupt',
  'pin_change_interrupt',
  'i2c_sda',
  'i2c_scl',
  'spi_mosi',
  'spi_miso',
  'spi_sck',
  'spi_ss',
  'uart_tx',
  'uart_rx',
  'input_only',
  'five_volt_tolerant',
  'strapping',
  'reserved_flash',
] as const;
export type PinCapability = (typeof pinCapabilities)[number];

/** Capabilities that are a caution rather than a function: using the pin needs a reason. */
const capabilitiesNeedingReason: readonly PinCapability[] = ['strapping', 'reserved_flash'];

export const pinCapabilityEntrySchema = z
  .strictObject({
    function: z.enum(pinCapabilities),
    /** The datasheet's name for it: "INT0", "OC2B", "SPI0 RX", "ADC1_CH7". */
    detail: z.string().trim().min(1).optional(),
    reason: z.string().trim().min(1).optional(),
    /** Defaults to the pin's `source` (the function table the pin's row comes from). */
    source: sourceRefSchema.optional(),
  })
  .refine((c) => !capabilitiesNeedingReason.includes(c.function) || c.reason !== undefined, {
    message: 'strapping and reserved_flash need a reason',
    path: ['reason'],
  });
export type PinCapabilityEntry = z.infer<typeof pinCapabilityEntrySchema>;

export const partPinSchema = z.strictObject({
  /** Canonical name, unique in the part: the port pin ("PD2", "GPIO35") or signal ("ADC6"). */
  name: z.string().trim().min(1),
  port: z.string().trim().min(1).optional(),
  board: z.string().trim().min(1).optional(),
  packagePin: z
    .strictObject({ number: z.string().trim().min(1), package: z.string().trim().min(1), source: sourceRefSchema })
    .optional(),
  /** Other names people type for the pin ("7" for D7 in firmware). Board order is array order. */
  aliases: z.array(z.string().trim().min(1)).default([]),
  /** Functions outside the closed list, for information ("XCK", "T0", "AIN1"). */
  otherFunctions: z.array(z.string().trim().min(1)).default([]),
  note: z.string().trim().min(1).optional(),
  labelsSource: sourceRefSchema,
  /** The function table the pin's row is read from; the absence of a capability rests on it too. */
  source: sourceRefSchema,
  capabilities: z.array(pinCapabilityEntrySchema),
});
export type PartPin = z.infer<typeof partPinSchema>;

export const datasheetRefSchema = z.strictObject({
  title: z.string().trim().min(1),
  publisher: z.string().trim().min(1),
  revision: z.string().trim().min(1).optional(),
});

export const partProfileSchema = z
  .strictObject({
    slug: slugSchema,
    name: z.string().trim().min(1).max(120),
    kind: z.enum(partKinds),
    aliases: z.array(z.string().trim().min(1)).default([]),
    summary: z.string().trim().min(1).optional(),
    datasheets: z.array(datasheetRefSchema).min(1),
    supply: z.strictObject({
      /** What the documents call the supply, for messages: "VCC", "IOVDD", "VDD". */
      name: z.string().trim().min(1).max(16).default('VCC'),
      minVolts: z.number().positive(),
      maxVolts: z.number().positive(),
      /** The supply the checks assume when the pin map does not say. */
      nominalVolts: z.number().positive(),
      source: sourceRefSchema,
    }),
    memory: memoryCapacitiesSchema.optional(),
    speedGrades: z.array(speedGradeSchema).default([]),
    levels: z.strictObject({
      inputs: z.array(inputLevelRowSchema).default([]),
      outputs: z.array(outputLevelRowSchema).default([]),
    }),
    inputLimit: inputLimitSchema.optional(),
    pins: z.array(partPinSchema).default([]),
  })
  .superRefine((profile, ctx) => {
    const { supply } = profile;
    if (
      supply.minVolts > supply.maxVolts ||
      supply.nominalVolts < supply.minVolts ||
      supply.nominalVolts > supply.maxVolts
    ) {
      ctx.addIssue({ code: 'custom', path: ['supply'], message: 'need minVolts ≤ nominalVolts ≤ maxVolts' });
    }
    const names = new Map<string, number>();
    profile.pins.forEach((pin, index) => {
      for (const label of pinLabels(pin)) {
        const key = normaliseLabel(label);
        const previous = names.get(key);
        if (previous !== undefined && previous !== index) {
          ctx.addIssue({ code: 'custom', path: ['pins', index], message: `label "${label}" is used by two pins` });
        }
        names.set(key, index);
      }
      const has = (c: PinCapability) => pin.capabilities.some((entry) => entry.function === c);
      if (has('input_only') && has('digital_out')) {
        ctx.addIssue({
          code: 'custom',
          path: ['pins', index],
          message: `${pin.name} is input_only but lists digital_out`,
        });
      }
      if (has('five_volt_tolerant') && profile.inputLimit?.tolerantMaxVolts === undefined) {
        ctx.addIssue({
          code: 'custom',
          path: ['inputLimit', 'tolerantMaxVolts'],
          message: `${pin.name} is five_volt_tolerant: state the limit that applies to it`,
        });
      }
    });
    if (profile.pins.length > 0 && profile.inputLimit === undefined) {
      ctx.addIssue({ code: 'custom', path: ['inputLimit'], message: 'a part with pins needs its input limit' });
    }
  });
export type PartProfile = z.infer<typeof partProfileSchema>;
/** What a data file holds before defaults are applied. */
export type PartProfileInput = z.input<typeof partProfileSchema>;

/** Every label a pin answers to, in the order a person would recognise them. */
export function pinLabels(pin: PartPin): string[] {
  const labels = [pin.board, pin.port, pin.name, ...pin.aliases].filter((l): l is string => l !== undefined);
  return [...new Set(labels)];
}

/** Labels compare without case, spaces, hyphens or underscores: "gpio 35" = "GPIO35". */
export function normaliseLabel(label: string): string {
  return label
    .normalize('NFKC')
    .toUpperCase()
    .replace(/[\s_-]+/g, '');
}

/** "D7 (PD7)", "GPIO35", "A6 (ADC6)": the board label first, the port in brackets. */
export function pinDisplayName(pin: PartPin): string {
  const primary = pin.board ?? pin.port ?? pin.name;
  const secondary = pin.board ? (pin.port ?? pin.name) : undefined;
  return secondary && secondary !== primary ? `${primary} (${secondary})` : primary;
}

// ---------------------------------------------------------------------------------------------
// Pin maps (a project's assignment of pins to signals)

/** Functions a pin map row may require of its pin. */
export const requiredFunctions = [
  'digital_in',
  'digital_out',
  'analog_in',
  'pwm',
  'ext_interrupt',
  'pin_change_interrupt',
  'i2c_sda',
  'i2c_scl',
  'spi_mosi',
  'spi_miso',
  'spi_sck',
  'spi_ss',
  'uart_tx',
  'uart_rx',
] as const satisfies readonly PinCapability[];
export type RequiredFunction = (typeof requiredFunctions)[number];

export const pinMapRowSchema = z.strictObject({
  pin: z.string().trim().min(1).max(40),
  signal: z.string().trim().min(1).max(80),
  function: z.enum(requiredFunctions),
  /** The highest voltage the outside circuit puts on the pin, if it drives it. */
  drivenAtVolts: z.number().finite().min(-50).max(50).optional(),
});
export type PinMapRow = z.infer<typeof pinMapRowSchema>;

// ---------------------------------------------------------------------------------------------
// Values the checks evaluate

/** A capability's source: its own, else the function table of the pin. */
export function capabilitySource(pin: PartPin, capability: PinCapability): SourceRef {
  return pin.capabilities.find((c) => c.function === capability)?.source ?? pin.source;
}

export function hasCapability(pin: PartPin, capability: PinCapability): boolean {
  return pin.capabilities.some((c) => c.function === capability);
}

export interface InputLimitAt {
  maxVolts: number;
  minVolts?: number;
  /** How the document states it: "VCC + 0.5 V". */
  stated: string;
  tolerant: boolean;
  source: SourceRef;
}

/**
 * The most an input may see at the given supply. A pin marked five_volt_tolerant (or a part whose
 * inputs are all documented tolerant) uses the tolerant limit instead of the supply-relative one.
 */
export function inputLimitAt(profile: PartProfile, supplyVolts: number, pin?: PartPin): InputLimitAt | undefined {
  const limit = profile.inputLimit;
  if (!limit) return undefined;
  const tolerant = limit.fiveVoltTolerant || (pin !== undefined && hasCapability(pin, 'five_volt_tolerant'));
  if (tolerant && limit.tolerantMaxVolts !== undefined) {
    return {
      maxVolts: limit.tolerantMaxVolts,
      minVolts: limit.minVolts,
      stated: `${limit.tolerantMaxVolts} V (5 V tolerant)`,
      tolerant: true,
      source:
        pin && hasCapability(pin, 'five_volt_tolerant') ? capabilitySource(pin, 'five_volt_tolerant') : limit.source,
    };
  }
  return {
    maxVolts: roundMillivolts(thresholdAt(limit.maxVolts, supplyVolts)),
    minVolts: limit.minVolts,
    stated: describeThreshold(limit.maxVolts, profile.supply.name),
    tolerant,
    source: limit.source,
  };
}

/**
 * Volts rounded to 1 mV. Datasheet values have at most two decimals; rounding keeps 2.4 − 2.0 at
 * 0.4 instead of 0.39999999999999997, so a margin exactly at a limit is judged as written.
 */
export function roundMillivolts(volts: number): number {
  return Math.round(volts * 1000) / 1000;
}
