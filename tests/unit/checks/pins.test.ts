/**
 * The pin check against pin maps that misuse the seeded parts. Expected verdicts follow from the
 * reference list (cited per test), never from the check's own output.
 */
import { describe, expect, it } from 'vitest';
import { loadPartProfiles } from '../../../db/parts/load';
import type { PartProfile, PinMapRow } from '../../../shared/contracts/parts';
import { startingCategories } from '../../../shared/domain';
import { checkPinMap, findingToErratumDraft, resolvePin, type PinFinding } from '../../../shared/checks/pins';

const profiles = loadPartProfiles();
const part = (slug: string): PartProfile => profiles.find((p) => p.slug === slug)!;
const avr = part('atmega328p');
const rp = part('rp2040');
const esp = part('esp32');

const codes = (findings: PinFinding[]) => findings.map((f) => `${f.severity}:${f.code}:${f.rowIndexes.join('+')}`);

describe('resolvePin', () => {
  it.each([
    // ATmega328P board label, port pin (datasheet ch. 18), firmware number, TQFP pin (from memory: pin 11 is PD7)
    [avr, 'd7', 'PD7'],
    [avr, 'PD7', 'PD7'],
    [avr, ' pd7 ', 'PD7'],
    [avr, '7', 'PD7'],
    [avr, 'pin 11', 'PD7'],
    [avr, '#11', 'PD7'],
    [avr, 'a6', 'ADC6'],
    [avr, 'ADC6', 'ADC6'],
    [avr, 'D07', 'PD7'],
    // ESP32: GPIO35, IO35 and the bare number are the same pin
    [esp, 'GPIO35', 'GPIO35'],
    [esp, 'gpio 35', 'GPIO35'],
    [esp, 'IO35', 'GPIO35'],
    [esp, 'GP35', 'GPIO35'],
    [esp, '35', 'GPIO35'],
    // RP2040 board label GP26 = GPIO26; GPIO25 is not on the header but still answers to GP25
    [rp, 'GP26', 'GPIO26'],
    [rp, 'gpio26', 'GPIO26'],
    [rp, 'GP25', 'GPIO25'],
    [rp, 'io_26', 'GPIO26'],
  ])('%#: %s → %s', (profile, label, name) => {
    expect(resolvePin(profile, label)?.name).toBe(name);
  });

  it.each([
    [avr, 'D14'],
    [avr, 'PC6'],
    [avr, 'pin 3'], // TQFP pin 3 is GND, not an I/O pin
    [esp, 'GPIO20'], // the ESP32 list skips GPIO20 (GPIO0–19, 21–23, 25–27, 32–39)
    [esp, 'GPIO24'],
    [rp, 'GP30'],
    [rp, ''],
  ])('%#: %s is not a pin', (profile, label) => {
    expect(resolvePin(profile, label)).toBeUndefined();
  });
});

describe('checkPinMap', () => {
  it('accepts a map that uses every pin as the datasheet allows', () => {
    // ATmega328P ch. 18: D2 INT0, D3 OC2B, A4/A5 TWI, D11–D13 SPI, A0 ADC0, D0/D1 USART0.
    const rows: PinMapRow[] = [
      { pin: 'D0', signal: 'RX', function: 'uart_rx' },
      { pin: 'D1', signal: 'TX', function: 'uart_tx' },
      { pin: 'D2', signal: 'BUTTON', function: 'ext_interrupt' },
      { pin: 'D3', signal: 'LED_DIM', function: 'pwm' },
      { pin: 'A4', signal: 'SDA', function: 'i2c_sda' },
      { pin: 'A5', signal: 'SCL', function: 'i2c_scl' },
      { pin: 'D11', signal: 'MOSI', function: 'spi_mosi' },
      { pin: 'D12', signal: 'MISO', function: 'spi_miso' },
      { pin: 'D13', signal: 'SCK', function: 'spi_sck' },
      { pin: 'A0', signal: 'POT', function: 'analog_in', drivenAtVolts: 5 },
      { pin: 'A6', signal: 'BATTERY', function: 'analog_in' },
      { pin: 'D7', signal: 'KEYPAD', function: 'pin_change_interrupt' },
    ];
    expect(checkPinMap(avr, rows)).toEqual([]);
  });

  it('digital output on A6 is an error: analog input only (ATmega328P pin descriptions, ADC7:6)', () => {
    const findings = checkPinMap(avr, [{ pin: 'A6', signal: 'RELAY', function: 'digital_out' }]);
    expect(codes(findings)).toEqual(['error:analog_only:0']);
    expect(findings[0]!.pin).toBe('A6 (ADC6)');
    expect(findings[0]!.source.section).toMatch(/ADC7:6/);
    // Board order …A3, A4, A5, A6, A7: A7 is analog only as well, so the nearest outputs are A5, A4, A3.
    expect(findings[0]!.nearest).toEqual(['A5 (PC5)', 'A4 (PC4)', 'A3 (PC3)']);
  });

  it('digital input on A7 is an error too: no digital input buffer, no pull-up', () => {
    expect(codes(checkPinMap(avr, [{ pin: 'A7', signal: 'SWITCH', function: 'digital_in' }]))).toEqual([
      'error:analog_only:0',
    ]);
  });

  it('output on GPIO35 is an error: input only (ESP-IDF "GPIO & RTC GPIO")', () => {
    const findings = checkPinMap(esp, [{ pin: 'GPIO35', signal: 'LED', function: 'digital_out' }]);
    expect(codes(findings)).toEqual(['error:input_only:0']);
    expect(findings[0]!.source.section).toBe('GPIO & RTC GPIO');
    // GPIO34 and GPIO36 are input only as well; the nearest outputs in GPIO order are GPIO33 and GPIO32.
    expect(findings[0]!.nearest?.slice(0, 2)).toEqual(['GPIO33', 'GPIO32']);
  });

  it('UART TX and I²C on an input-only pin are errors, not software-bus warnings', () => {
    const findings = checkPinMap(esp, [
      { pin: 'GPIO36', signal: 'TX', function: 'uart_tx' },
      { pin: 'GPIO39', signal: 'SDA', function: 'i2c_sda' },
      { pin: 'GPIO34', signal: 'RX', function: 'uart_rx' }, // receiving is fine through the GPIO matrix
    ]);
    expect(codes(findings)).toEqual(['error:input_only:0', 'error:input_only:1']);
  });

  it('external interrupt on D7 is an error naming D3 and D2, and the pin-change interrupt D7 does have', () => {
    // ATmega328P ch. 18: INT0 on PD2, INT1 on PD3, PCINT23 on PD7.
    const findings = checkPinMap(avr, [{ pin: 'D7', signal: 'ENCODER_A', function: 'ext_interrupt' }]);
    expect(codes(findings)).toEqual(['error:no_interrupt:0']);
    expect(findings[0]!.nearest).toEqual(['D3 (PD3)', 'D2 (PD2)']);
    expect(findings[0]!.suggestion).toMatch(/D3 \(PD3\) or D2 \(PD2\)/);
    expect(findings[0]!.suggestion).toMatch(/PCINT23/);
  });

  it('leaves pins already in the map out of the nearest suggestions', () => {
    const findings = checkPinMap(avr, [
      { pin: 'D2', signal: 'BUTTON', function: 'ext_interrupt' },
      { pin: 'D7', signal: 'ENCODER_A', function: 'ext_interrupt' },
    ]);
    expect(findings.find((f) => f.code === 'no_interrupt')?.nearest).toEqual(['D3 (PD3)']);
  });

  it('pin-change interrupt on A6 is an error: ADC6 has none', () => {
    const findings = checkPinMap(avr, [{ pin: 'A6', signal: 'TAMPER', function: 'pin_change_interrupt' }]);
    expect(codes(findings)).toEqual(['error:no_interrupt:0']);
    expect(findings[0]!.nearest).toEqual(['A5 (PC5)', 'A4 (PC4)', 'A3 (PC3)']);
  });

  it('GPIO6 is a flash pin: a warning with the reason (ESP-IDF: GPIO6–11 wired to the SPI flash)', () => {
    const findings = checkPinMap(esp, [{ pin: 'GPIO6', signal: 'BUZZER', function: 'digital_out' }]);
    expect(codes(findings)).toEqual(['warning:flash_pin:0']);
    expect(findings[0]!.message).toMatch(/SPI flash/);
  });

  it('strapping pins GPIO12 and GPIO0 give warnings with their reasons (corroborated)', () => {
    const findings = checkPinMap(esp, [
      { pin: 'GPIO12', signal: 'HEATER', function: 'digital_out' },
      { pin: 'IO0', signal: 'BUTTON', function: 'digital_in' },
    ]);
    expect(codes(findings)).toEqual(['warning:strapping_pin:0', 'warning:strapping_pin:1']);
    expect(findings[0]!.message).toMatch(/flash voltage/);
    expect(findings[0]!.source.confidence).toBe('corroborated');
  });

  it('the same pin twice is an error listing both rows, however the pin is written', () => {
    const findings = checkPinMap(avr, [
      { pin: 'D9', signal: 'SERVO', function: 'pwm' },
      { pin: 'A1', signal: 'LDR', function: 'analog_in' },
      { pin: 'PB1', signal: 'BUZZER', function: 'pwm' },
    ]);
    expect(codes(findings)).toEqual(['error:pin_used_twice:0+2']);
    expect(findings[0]!.message).toMatch(/SERVO and BUZZER/);
  });

  it('software I²C on D4/D5 is a warning pointing at A4/A5 (TWI SDA/SCL on PC4/PC5)', () => {
    const findings = checkPinMap(avr, [
      { pin: 'D4', signal: 'SDA', function: 'i2c_sda' },
      { pin: 'D5', signal: 'SCL', function: 'i2c_scl' },
    ]);
    expect(codes(findings)).toEqual(['warning:software_bus:0', 'warning:software_bus:1']);
    expect(findings[0]!.nearest).toEqual(['A4 (PC4)']);
    expect(findings[1]!.nearest).toEqual(['A5 (PC5)']);
    expect(findings[0]!.message).toMatch(/software I²C/);
  });

  it('UART TX on RP2040 GP1 is a software-bus warning: GP1 is UART0 RX, GP0 and GP4 carry TX', () => {
    const findings = checkPinMap(rp, [{ pin: 'GP1', signal: 'GPS_TX', function: 'uart_tx' }]);
    expect(codes(findings)).toEqual(['warning:software_bus:0']);
    expect(findings[0]!.nearest).toEqual(['GP0 (GPIO0)', 'GP4 (GPIO4)', 'GP8 (GPIO8)']);
  });

  it('PWM on D4 is an error: PD4 has no output-compare pin; nearest D3 and D5', () => {
    const findings = checkPinMap(avr, [{ pin: 'D4', signal: 'FAN', function: 'pwm' }]);
    expect(codes(findings)).toEqual(['error:function_not_supported:0']);
    expect(findings[0]!.nearest?.slice(0, 2)).toEqual(['D3 (PD3)', 'D5 (PD5)']);
  });

  it('analog input on an RP2040 pin other than GPIO26–29 is an error', () => {
    const findings = checkPinMap(rp, [{ pin: 'GP22', signal: 'THERMISTOR', function: 'analog_in' }]);
    expect(codes(findings)).toEqual(['error:function_not_supported:0']);
    expect(findings[0]!.nearest).toEqual(['GP26 (GPIO26)', 'GP27 (GPIO27)', 'GP28 (GPIO28)']);
  });

  it('5 V into an RP2040 pin is an error: limit IOVDD + 0.5 V = 3.8 V at 3.3 V (Table 621)', () => {
    const findings = checkPinMap(rp, [{ pin: 'GP2', signal: 'SENSOR_OUT', function: 'digital_in', drivenAtVolts: 5 }]);
    expect(codes(findings)).toEqual(['error:over_voltage:0']);
    expect(findings[0]!.message).toMatch(/3\.8 V/); // 3.3 + 0.5 = 3.8
    expect(findings[0]!.source.section).toMatch(/Table 621/);
  });

  it('3.8 V exactly is still within IOVDD + 0.5 V; 3.81 V is not', () => {
    expect(checkPinMap(rp, [{ pin: 'GP2', signal: 'S', function: 'digital_in', drivenAtVolts: 3.8 }])).toEqual([]);
    expect(codes(checkPinMap(rp, [{ pin: 'GP2', signal: 'S', function: 'digital_in', drivenAtVolts: 3.81 }]))).toEqual([
      'error:over_voltage:0',
    ]);
  });

  it('5 V into an ATmega328P is fine at VCC 5 V but not at 3.3 V (Table 32-1: VCC + 0.5 V = 3.8 V)', () => {
    const row: PinMapRow = { pin: 'D8', signal: 'PIR', function: 'digital_in', drivenAtVolts: 5 };
    expect(checkPinMap(avr, [row])).toEqual([]);
    expect(codes(checkPinMap(avr, [row], { supplyVolts: 3.3 }))).toEqual(['error:over_voltage:0']);
  });

  it('5 V into an ESP32 pin is an error: VDD + 0.3 V = 3.6 V (module datasheet Table 6, corroborated)', () => {
    const findings = checkPinMap(esp, [{ pin: 'GPIO4', signal: 'ECHO', function: 'digital_in', drivenAtVolts: 5 }]);
    expect(codes(findings)).toEqual(['error:over_voltage:0']);
    expect(findings[0]!.message).toMatch(/3\.6 V/);
  });

  it('a negative swing below −0.5 V is an error on the ATmega328P (Table 32-1)', () => {
    expect(
      codes(checkPinMap(avr, [{ pin: 'D8', signal: 'RS232', function: 'digital_in', drivenAtVolts: -12 }])),
    ).toEqual(['error:under_voltage:0']);
  });

  it("an unknown pin is an error that suggests the part's label forms", () => {
    const findings = checkPinMap(avr, [{ pin: 'D14', signal: 'LED', function: 'digital_out' }]);
    expect(codes(findings)).toEqual(['error:unknown_pin:0']);
    expect(findings[0]!.pin).toBe('D14');
    expect(findings[0]!.suggestion).toMatch(/D0, PD0, pin 30/);
  });

  it('reports findings in pin map order', () => {
    const findings = checkPinMap(esp, [
      { pin: 'GPIO2', signal: 'LED', function: 'digital_out' },
      { pin: 'GPIO99', signal: 'X', function: 'digital_in' },
      { pin: 'GPIO35', signal: 'RELAY', function: 'digital_out' },
    ]);
    expect(findings.map((f) => f.rowIndexes[0])).toEqual([0, 1, 2]);
  });
});

describe('findingToErratumDraft', () => {
  const categorySlugs = startingCategories.map((c) => c.slug) as string[];

  it('turns an input-only finding into a pin-capability erratum with the datasheet citation', () => {
    const rows: PinMapRow[] = [{ pin: 'GPIO35', signal: 'RELAY', function: 'digital_out' }];
    const [finding] = checkPinMap(esp, rows);
    const draft = findingToErratumDraft(finding!, { partName: 'ESP32', rows });
    expect(draft.category).toBe('pin-capability');
    expect(categorySlugs).toContain(draft.category);
    expect(draft.severity).toBe('major');
    expect(draft.location).toEqual({ parts: ['ESP32'], pins: ['GPIO35'] });
    expect(draft.title).toMatch(/RELAY/);
    expect(draft.symptom).toMatch(/RELAY/);
    expect(draft.cause).toMatch(/ESP-IDF Programming Guide \(ESP32\), GPIO & RTC GPIO \(datasheet\)/);
    expect(draft.fix).toMatch(/GPIO33/);
  });

  it('turns an over-voltage finding into a critical logic-level erratum', () => {
    const rows: PinMapRow[] = [{ pin: 'GP2', signal: 'SENSOR_OUT', function: 'digital_in', drivenAtVolts: 5 }];
    const [finding] = checkPinMap(rp, rows);
    const draft = findingToErratumDraft(finding!, { partName: 'U1 RP2040', rows });
    expect(draft).toMatchObject({
      category: 'logic-level',
      severity: 'critical',
      location: { parts: ['U1 RP2040'], pins: ['GP2 (GPIO2)'] },
    });
    expect(categorySlugs).toContain(draft.category);
    expect(draft.fix).toMatch(/level shifter/);
  });

  it('names every signal of a shared pin, and a warning becomes a minor erratum', () => {
    const rows: PinMapRow[] = [
      { pin: 'D9', signal: 'SERVO', function: 'pwm' },
      { pin: 'PB1', signal: 'BUZZER', function: 'pwm' },
    ];
    const [dup] = checkPinMap(avr, rows);
    expect(findingToErratumDraft(dup!, { partName: 'ATmega328P', rows }).title).toMatch(/SERVO and BUZZER/);
    const swRows: PinMapRow[] = [{ pin: 'D4', signal: 'SDA', function: 'i2c_sda' }];
    const [soft] = checkPinMap(avr, swRows);
    expect(findingToErratumDraft(soft!, { partName: 'ATmega328P', rows: swRows }).severity).toBe('minor');
  });
});
