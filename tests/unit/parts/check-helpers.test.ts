/**
 * The pure pieces the parts and check pages lean on: capability names in words, the pin and part
 * filters, the input row the RC helper picks, and the number formats.
 */
import { describe, expect, it } from 'vitest';
import { formatHertz, formatSeconds, formatVolts, parseNumber } from '@/components/checks/format';
import { inputRowAt } from '@/components/checks/input-levels';
import { capabilityLabel, partMatches, pinMatches } from '@/components/parts/display';
import { profile } from './fixtures';

const atmega = profile('atmega328p');
const pin = (name: string) => atmega.pins.find((p) => p.name === name)!;

describe('capability labels', () => {
  it('names a function with the datasheet detail, and a caution with its reason', () => {
    expect(capabilityLabel({ function: 'ext_interrupt', detail: 'INT0' })).toBe('Ext. interrupt (INT0)');
    expect(capabilityLabel({ function: 'i2c_sda', detail: 'SDA' })).toBe('I²C SDA (SDA)');
    expect(capabilityLabel({ function: 'digital_out' })).toBe('Digital out');
    expect(capabilityLabel({ function: 'input_only' })).toBe('Input only');
    expect(capabilityLabel({ function: 'strapping', reason: 'sampled at reset' })).toBe('Strapping — sampled at reset');
    expect(capabilityLabel({ function: 'reserved_flash', reason: 'wired to the flash chip' })).toBe(
      'Reserved for flash — wired to the flash chip',
    );
  });
});

describe('filters', () => {
  it('finds a pin by board label, port or capability, ignoring case', () => {
    expect(pinMatches(pin('ADC6'), 'a6')).toBe(true);
    expect(pinMatches(pin('PD2'), 'pd2')).toBe(true);
    expect(pinMatches(pin('PD2'), 'int0')).toBe(true);
    expect(pinMatches(pin('ADC6'), 'digital out')).toBe(false);
    expect(pinMatches(pin('ADC6'), '  ')).toBe(true);
  });

  it('finds a part by name or alias', () => {
    expect(partMatches({ name: 'ATmega328P', slug: 'atmega328p', aliases: ['328P'] }, '328')).toBe(true);
    expect(partMatches({ name: '74HC', slug: '74hc', aliases: ['HC CMOS'] }, 'cmos')).toBe(true);
    expect(partMatches({ name: '74HC', slug: '74hc', aliases: [] }, 'esp')).toBe(false);
  });
});

describe('inputRowAt', () => {
  it('takes the row whose window holds the supply', () => {
    // ATmega328P Table 32-2 (DS40001984A): one input row for VCC 2.4–5.5 V, VIH 0.6·VCC, VIL 0.3·VCC.
    const at33 = inputRowAt(atmega, 3.3)!;
    expect(at33.extrapolated).toBe(false);
    expect(at33.row.supply).toEqual({ minVolts: 2.4, maxVolts: 5.5 });
    expect(at33.row.vih).toMatchObject({ kind: 'fraction_of_supply', fraction: 0.6 });
  });

  it('falls back to the nearest row, marked extrapolated, and has nothing for a part without inputs', () => {
    // 74HC: only the VCC = 4.5 V row is on file (TI SN74HC240, SCLS128H §4.2); 5 V is 0.5 V away.
    const hc = inputRowAt(profile('74hc'), 5)!;
    expect(hc.extrapolated).toBe(true);
    expect(hc.row.vih).toMatchObject({ kind: 'volts', volts: 3.15 });
    // ATmega328P below its 2.4 V row: still that row, extrapolated.
    expect(inputRowAt(atmega, 1.8)!.extrapolated).toBe(true);
    expect(inputRowAt({ ...atmega, levels: { inputs: [], outputs: [] } }, 5)).toBeNull();
  });
});

describe('formats', () => {
  it('shows seconds, hertz and volts with a sensible unit', () => {
    expect(formatSeconds(0.0012039728)).toBe('1.204 ms');
    expect(formatSeconds(2.5e-5)).toBe('25 µs');
    expect(formatSeconds(1.5)).toBe('1.5 s');
    expect(formatHertz(159.15494)).toBe('159.2 Hz');
    expect(formatHertz(15915.494)).toBe('15.92 kHz');
    expect(formatVolts(-0.05)).toBe('−0.05 V');
    expect(formatVolts(0.45, true)).toBe('+0.45 V');
    expect(formatVolts(0)).toBe('0 V');
  });

  it('reads a typed number, with a comma as decimal mark', () => {
    expect(parseNumber('3,3')).toBe(3.3);
    expect(parseNumber(' 5 ')).toBe(5);
    expect(parseNumber('')).toBeNull();
    expect(parseNumber('abc')).toBeNull();
  });
});
