/**
 * The seeded part profiles against the published values in the reference list. Each expectation
 * names the document it comes from; the profile data is never the expected value.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { loadPartProfiles, parsePartDataFile, PartDataError, partsFolder } from '../../../db/parts/load';
import {
  capabilitySource,
  hasCapability,
  type PartPin,
  type PartProfile,
  type PinCapability,
} from '../../../shared/contracts/parts';
import { resolvePin } from '../../../shared/checks/pins';

const profiles = loadPartProfiles();
const dataFile = (name: string) => fs.readFileSync(path.join(partsFolder, name), 'utf8');
function part(slug: string): PartProfile {
  const found = profiles.find((p) => p.slug === slug);
  if (!found) throw new Error(`no profile ${slug}`);
  return found;
}
function pin(profile: PartProfile, label: string): PartPin {
  const found = resolvePin(profile, label);
  if (!found) throw new Error(`${profile.slug} has no pin ${label}`);
  return found;
}
function caps(profile: PartProfile, label: string): PinCapability[] {
  return pin(profile, label).capabilities.map((c) => c.function);
}
function detail(profile: PartProfile, label: string, fn: PinCapability): string | undefined {
  return pin(profile, label).capabilities.find((c) => c.function === fn)?.detail;
}

describe('part data files', () => {
  it('load and validate: three microcontrollers/modules and the seven logic families', () => {
    expect(profiles.map((p) => p.slug).sort()).toEqual(
      [
        '74hc',
        '74hct',
        'atmega328p',
        'cmos-1v8',
        'cmos-2v5',
        'esp32',
        'lvcmos-3v3',
        'lvttl-3v3',
        'rp2040',
        'ttl-5v',
      ].sort(),
    );
    expect(part('atmega328p').aliases).toEqual(expect.arrayContaining(['ATmega328P', '328P', 'ATmega328']));
    expect(profiles.filter((p) => p.kind === 'logic_family')).toHaveLength(7);
  });

  it('refuse a value that names a source the file does not define', () => {
    const text = JSON.stringify({ sources: {}, parts: [{ slug: 'x1', source: 'nowhere' }] });
    expect(() => parsePartDataFile(text, 'bad.json')).toThrow(/names source "nowhere"/);
  });

  it('refuse a profile that breaks the contract, naming the file', () => {
    const file = JSON.parse(dataFile('atmega328p.json'));
    const text = JSON.stringify({ ...file, parts: [{ ...file.parts[0], kind: 'relay' }] });
    expect(() => parsePartDataFile(text, 'atmega-broken.json')).toThrow(PartDataError);
    expect(() => parsePartDataFile(text, 'atmega-broken.json')).toThrow(/atmega-broken\.json: parts\[0\].*kind/s);
  });

  it('refuse a strapping or flash mark without its reason', () => {
    const file = JSON.parse(dataFile('esp32.json'));
    const gpio6 = file.parts[0].pins.find((p: { name: string }) => p.name === 'GPIO6');
    for (const c of gpio6.capabilities) delete c.reason;
    expect(() => parsePartDataFile(JSON.stringify(file), 'esp32-no-reason.json')).toThrow(/need a reason/);
  });

  const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'parts-'));
  afterAll(() => fs.rmSync(tmp, { recursive: true, force: true }));
  it('refuse the same slug in two files', () => {
    const text = dataFile('rp2040.json');
    fs.writeFileSync(path.join(tmp, 'a.json'), text);
    fs.writeFileSync(path.join(tmp, 'b.json'), text);
    expect(() => loadPartProfiles(tmp)).toThrow(/slug "rp2040" is already used in a\.json/);
  });

  it('carry a source with a confidence label on every value', () => {
    for (const profile of profiles) {
      const walk = (value: unknown, at: string): void => {
        if (Array.isArray(value)) return value.forEach((v, i) => walk(v, `${at}[${i}]`));
        if (typeof value !== 'object' || value === null) return;
        const record = value as Record<string, unknown>;
        if (
          'volts' in record ||
          'fraction' in record ||
          'offsetVolts' in record ||
          'bytes' in record ||
          'maxMHz' in record
        ) {
          // A threshold inside inputLimit carries its source one level up (on the limit itself).
          if (!at.endsWith('maxVolts')) expect(record.source, `${profile.slug} ${at}`).toBeDefined();
        }
        for (const [k, v] of Object.entries(record)) walk(v, `${at}.${k}`);
      };
      walk(profile, profile.slug);
    }
  });
});

describe('ATmega328P pin profile (Microchip ATmega328/P datasheet DS40001984A ch. 18; board labels per the AVR board core variants)', () => {
  const avr = part('atmega328p');

  it('has D0–D13 and A0–A7 in board order', () => {
    expect(avr.pins.map((p) => p.board)).toEqual([
      ...Array.from({ length: 14 }, (_, i) => `D${i}`),
      ...Array.from({ length: 8 }, (_, i) => `A${i}`),
    ]);
  });

  it('maps board labels to the port pins of the reference table', () => {
    const expected: Record<string, string> = {
      D0: 'PD0',
      D1: 'PD1',
      D2: 'PD2',
      D3: 'PD3',
      D4: 'PD4',
      D5: 'PD5',
      D6: 'PD6',
      D7: 'PD7',
      D8: 'PB0',
      D9: 'PB1',
      D10: 'PB2',
      D11: 'PB3',
      D12: 'PB4',
      D13: 'PB5',
      A0: 'PC0',
      A1: 'PC1',
      A2: 'PC2',
      A3: 'PC3',
      A4: 'PC4',
      A5: 'PC5',
    };
    for (const [board, port] of Object.entries(expected)) expect(pin(avr, board).port, board).toBe(port);
  });

  it('A6 and A7 are analog inputs only: no digital I/O, no pull-up, no pin-change interrupt (pin descriptions, "ADC7:6 serve as analog inputs")', () => {
    for (const label of ['A6', 'A7']) {
      expect(caps(avr, label)).toEqual(['analog_in']);
      expect(pin(avr, label).port).toBeUndefined();
    }
    expect(detail(avr, 'A6', 'analog_in')).toBe('ADC6');
  });

  it('D2 is INT0 and D3 is INT1 with PWM OC2B; no other pin has an external interrupt', () => {
    expect(detail(avr, 'D2', 'ext_interrupt')).toBe('INT0');
    expect(detail(avr, 'D3', 'ext_interrupt')).toBe('INT1');
    expect(detail(avr, 'D3', 'pwm')).toBe('OC2B');
    expect(avr.pins.filter((p) => hasCapability(p, 'ext_interrupt')).map((p) => p.board)).toEqual(['D2', 'D3']);
  });

  it('PWM on D3, D5, D6, D9, D10, D11 (OC2B, OC0B, OC0A, OC1A, OC1B, OC2A)', () => {
    expect(
      avr.pins
        .filter((p) => hasCapability(p, 'pwm'))
        .map((p) => `${p.board}:${p.capabilities.find((c) => c.function === 'pwm')?.detail}`),
    ).toEqual(['D3:OC2B', 'D5:OC0B', 'D6:OC0A', 'D9:OC1A', 'D10:OC1B', 'D11:OC2A']);
  });

  it('A4/A5 are SDA/SCL; D10–D13 are SS, MOSI, MISO, SCK; D0/D1 are RXD/TXD', () => {
    expect(caps(avr, 'A4')).toEqual(expect.arrayContaining(['i2c_sda', 'analog_in', 'digital_in', 'digital_out']));
    expect(caps(avr, 'A5')).toEqual(expect.arrayContaining(['i2c_scl', 'analog_in']));
    expect(caps(avr, 'D10')).toContain('spi_ss');
    expect(caps(avr, 'D11')).toContain('spi_mosi');
    expect(caps(avr, 'D12')).toContain('spi_miso');
    expect(caps(avr, 'D13')).toContain('spi_sck');
    expect(caps(avr, 'D0')).toContain('uart_rx');
    expect(caps(avr, 'D1')).toContain('uart_tx');
  });

  it('pin-change interrupts: PCINT16–23 on D0–D7, PCINT0–5 on D8–D13, PCINT8–13 on A0–A5', () => {
    const pcint = (label: string) => detail(avr, label, 'pin_change_interrupt');
    expect(['D0', 'D7', 'D8', 'D13', 'A0', 'A5'].map(pcint)).toEqual([
      'PCINT16',
      'PCINT23',
      'PCINT0',
      'PCINT5',
      'PCINT8',
      'PCINT13',
    ]);
  });

  it('memory: 32 KB flash, 2 KB SRAM, 1 KB EEPROM; bootloaders leave 32,256 or 30,720 bytes', () => {
    expect(avr.memory?.flash?.bytes).toBe(32 * 1024);
    expect(avr.memory?.sram.bytes).toBe(2 * 1024);
    expect(avr.memory?.eeprom?.bytes).toBe(1024);
    const left = avr.memory!.bootloaderOptions.map((o) => 32 * 1024 - o.reservedBytes);
    expect(left).toEqual([32256, 30720]);
  });

  it('DC characteristics Table 32-2 and absolute maximum Table 32-1', () => {
    const input = avr.levels.inputs[0]!;
    expect(input.supply).toEqual({ minVolts: 2.4, maxVolts: 5.5 });
    expect(input.vih).toMatchObject({ kind: 'fraction_of_supply', fraction: 0.6 });
    expect(input.vil).toMatchObject({ kind: 'fraction_of_supply', fraction: 0.3 });
    expect(input.vih.source.section).toMatch(/Table 32-2/);
    const at5 = avr.levels.outputs.find((r) => r.supply.minVolts === 5)!;
    expect(at5.voh).toMatchObject({ kind: 'volts', volts: 4.2, testCurrent: { milliamps: 20 } });
    expect(at5.vol).toMatchObject({ kind: 'volts', volts: 0.9, testCurrent: { milliamps: 20 } });
    const at3 = avr.levels.outputs.find((r) => r.supply.minVolts === 3)!;
    expect(at3.voh).toMatchObject({ volts: 2.3, testCurrent: { milliamps: 10 } });
    expect(at3.vol).toMatchObject({ volts: 0.6, testCurrent: { milliamps: 10 } });
    expect(avr.inputLimit).toMatchObject({
      maxVolts: { kind: 'supply_offset', offsetVolts: 0.5 },
      minVolts: -0.5,
      fiveVoltTolerant: false,
    });
    expect(avr.inputLimit?.source.section).toMatch(/Table 32-1/);
  });

  it('speed grades 4 MHz from 1.8 V, 10 MHz from 2.7 V, 20 MHz from 4.5 V', () => {
    expect(avr.speedGrades.map((g) => [g.maxMHz, g.minVolts, g.maxVolts])).toEqual([
      [4, 1.8, 5.5],
      [10, 2.7, 5.5],
      [20, 4.5, 5.5],
    ]);
  });

  it('labels the TQFP package pin numbers from_memory (not checked against the pin-configuration figure)', () => {
    expect(pin(avr, 'D7').packagePin?.source.confidence).toBe('from_memory');
  });
});

describe('RP2040 pin profile (Raspberry Pi RP2040 Datasheet ch. 5)', () => {
  const rp = part('rp2040');

  it('has GPIO0–GPIO29; ADC0–3 on GPIO26–29 and nowhere else (Table 614)', () => {
    expect(rp.pins.map((p) => p.name)).toEqual(Array.from({ length: 30 }, (_, i) => `GPIO${i}`));
    expect(
      rp.pins
        .filter((p) => hasCapability(p, 'analog_in'))
        .map((p) => `${p.name}:${p.capabilities.find((c) => c.function === 'analog_in')?.detail}`),
    ).toEqual(['GPIO26:ADC0', 'GPIO27:ADC1', 'GPIO28:ADC2', 'GPIO29:ADC3']);
    expect(capabilitySource(pin(rp, 'GPIO26'), 'analog_in').confidence).toBe('datasheet');
  });

  it('board labels GP0–GP22 and GP26–GP28 (the development board header)', () => {
    const boards = rp.pins.map((p) => p.board).filter(Boolean);
    expect(boards).toEqual([...Array.from({ length: 23 }, (_, i) => `GP${i}`), 'GP26', 'GP27', 'GP28']);
  });

  it('IOVDD ≤ 3.63 V; pins ≤ IOVDD + 0.5 V; not 5 V tolerant (Table 621)', () => {
    expect(rp.supply.maxVolts).toBe(3.63);
    expect(rp.inputLimit).toMatchObject({
      maxVolts: { kind: 'supply_offset', offsetVolts: 0.5 },
      fiveVoltTolerant: false,
    });
    expect(rp.pins.some((p) => hasCapability(p, 'five_volt_tolerant'))).toBe(false);
  });

  it('thresholds at IOVDD 3.3 V: VIH 2.0, VIL 0.8, VOH 2.62, VOL 0.5 (Table 624)', () => {
    expect(rp.levels.inputs[0]).toMatchObject({
      supply: { minVolts: 3.3, maxVolts: 3.3 },
      vih: { volts: 2.0 },
      vil: { volts: 0.8 },
    });
    expect(rp.levels.outputs[0]).toMatchObject({ voh: { volts: 2.62 }, vol: { volts: 0.5 } });
  });

  it('multiplexes UART, I²C and SPI on many pins (GPIO function table; corroborated, primary table not at hand)', () => {
    // GPIO0: SPI0 RX, UART0 TX, I2C0 SDA; GPIO4: UART1 TX; GPIO12: UART0 TX; GPIO21: I2C0 SCL.
    expect(detail(rp, 'GPIO0', 'uart_tx')).toBe('UART0 TX');
    expect(detail(rp, 'GPIO0', 'i2c_sda')).toBe('I2C0 SDA');
    expect(detail(rp, 'GPIO0', 'spi_miso')).toBe('SPI0 RX');
    expect(detail(rp, 'GPIO4', 'uart_tx')).toBe('UART1 TX');
    expect(detail(rp, 'GPIO12', 'uart_tx')).toBe('UART0 TX');
    expect(detail(rp, 'GPIO21', 'i2c_scl')).toBe('I2C0 SCL');
    expect(detail(rp, 'GPIO10', 'spi_sck')).toBe('SPI1 SCK');
    expect(detail(rp, 'GPIO19', 'spi_mosi')).toBe('SPI0 TX');
    expect(rp.pins.filter((p) => hasCapability(p, 'uart_tx')).map((p) => p.name)).toEqual([
      'GPIO0',
      'GPIO4',
      'GPIO8',
      'GPIO12',
      'GPIO16',
      'GPIO20',
      'GPIO24',
      'GPIO28',
    ]);
    expect(capabilitySource(pin(rp, 'GPIO0'), 'uart_tx').confidence).toBe('corroborated');
  });
});

describe('ESP32 pin profile (ESP-IDF Programming Guide "GPIO & RTC GPIO"; ESP32 Pin List v2.0 note 2)', () => {
  const esp = part('esp32');

  it('GPIO34–39 are input only, without pull-ups: no output function of any kind', () => {
    for (const n of [34, 35, 36, 37, 38, 39]) {
      const c = caps(esp, `GPIO${n}`);
      expect(c).toContain('input_only');
      for (const out of ['digital_out', 'pwm', 'uart_tx', 'spi_mosi', 'spi_sck', 'i2c_sda', 'i2c_scl'] as const) {
        expect(c, `GPIO${n} ${out}`).not.toContain(out);
      }
      expect(capabilitySource(pin(esp, `GPIO${n}`), 'input_only').confidence).toBe('datasheet');
    }
    expect(esp.pins.filter((p) => hasCapability(p, 'input_only')).map((p) => p.name)).toEqual([
      'GPIO34',
      'GPIO35',
      'GPIO36',
      'GPIO37',
      'GPIO38',
      'GPIO39',
    ]);
  });

  it('GPIO6–11 are reserved for the SPI flash, with a reason', () => {
    const flash = esp.pins.filter((p) => hasCapability(p, 'reserved_flash'));
    expect(flash.map((p) => p.name)).toEqual(['GPIO6', 'GPIO7', 'GPIO8', 'GPIO9', 'GPIO10', 'GPIO11']);
    for (const p of flash)
      expect(p.capabilities.find((c) => c.function === 'reserved_flash')?.reason).toMatch(/flash/i);
  });

  it('strapping pins GPIO0, 2, 5, 12, 15 — corroborated, the series datasheet itself not at hand', () => {
    const strapping = esp.pins.filter((p) => hasCapability(p, 'strapping'));
    expect(strapping.map((p) => p.name)).toEqual(['GPIO0', 'GPIO2', 'GPIO5', 'GPIO12', 'GPIO15']);
    for (const p of strapping) expect(capabilitySource(p, 'strapping').confidence).toBe('corroborated');
  });

  it('ADC1 on GPIO32–39 and ADC2 on GPIO0, 2, 4, 12–15, 25–27 (ESP-IDF "Analog to Digital Converter")', () => {
    const adc = esp.pins.filter((p) => hasCapability(p, 'analog_in')).map((p) => Number(p.name.slice(4)));
    expect(adc).toEqual([0, 2, 4, 12, 13, 14, 15, 25, 26, 27, 32, 33, 34, 35, 36, 37, 38, 39]);
    expect(detail(esp, 'GPIO36', 'analog_in')).toBe('ADC1_CH0');
  });

  it('3.3 V, not 5 V tolerant; VIH ≥ 0.75·VDD corroborated', () => {
    expect(esp.supply.nominalVolts).toBe(3.3);
    expect(esp.inputLimit?.fiveVoltTolerant).toBe(false);
    const vih = esp.levels.inputs[0]!.vih;
    expect(vih).toMatchObject({ kind: 'fraction_of_supply', fraction: 0.75 });
    expect(vih.source.confidence).toBe('corroborated');
  });

  it('labels the memory sizes and the GPIO interrupt capability from_memory', () => {
    expect(esp.memory?.sram.source.confidence).toBe('from_memory');
    expect(capabilitySource(pin(esp, 'GPIO4'), 'ext_interrupt').confidence).toBe('from_memory');
  });
});

describe('logic families (reference list, "Logic families" table)', () => {
  it.each([
    // slug, VIH, VIL, stated VOH, VOL; JEDEC rows are corroborated (vendor I/O tables citing the standard)
    ['lvttl-3v3', { volts: 2.0 }, { volts: 0.8 }, { volts: 2.4 }, { volts: 0.4 }, 'corroborated'],
    [
      'lvcmos-3v3',
      { volts: 2.0 },
      { volts: 0.8 },
      { kind: 'supply_offset', offsetVolts: -0.2 },
      { volts: 0.2 },
      'corroborated',
    ],
    ['cmos-2v5', { volts: 1.7 }, { volts: 0.7 }, { volts: 2.0 }, { volts: 0.4 }, 'corroborated'],
    [
      'cmos-1v8',
      { fraction: 0.65 },
      { fraction: 0.35 },
      { kind: 'supply_offset', offsetVolts: -0.45 },
      { volts: 0.45 },
      'corroborated',
    ],
    ['ttl-5v', { volts: 2.0 }, { volts: 0.8 }, { volts: 2.4 }, { volts: 0.4 }, 'datasheet'],
    ['74hc', { volts: 3.15 }, { volts: 1.35 }, { volts: 4.4 }, { volts: 0.1 }, 'datasheet'],
  ])('%s', (slug, vih, vil, voh, vol, confidence) => {
    const family = part(slug);
    expect(family.kind).toBe('logic_family');
    expect(family.levels.inputs[0]).toMatchObject({ vih, vil });
    expect(family.levels.outputs[0]).toMatchObject({ voh, vol });
    expect(family.levels.inputs[0]!.vih.source.confidence).toBe(confidence);
  });

  it('74HCT: VIH 2.0 V, VIL 0.8 V at 4.5–5.5 V (TI SCLS042F §5.2); no output levels on file', () => {
    const hct = part('74hct');
    expect(hct.levels.inputs[0]).toMatchObject({
      supply: { minVolts: 4.5, maxVolts: 5.5 },
      vih: { volts: 2.0 },
      vil: { volts: 0.8 },
    });
    expect(hct.levels.outputs).toEqual([]);
  });

  it('5 V TTL output currents are labelled from_memory', () => {
    expect(part('ttl-5v').levels.outputs[0]!.voh.testCurrent?.source.confidence).toBe('from_memory');
  });
});
