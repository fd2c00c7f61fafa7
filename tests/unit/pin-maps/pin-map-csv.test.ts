/**
 * CSV import of pin map rows: the files spreadsheets and EDA tools actually write (either
 * separator, RFC 4180 quotes, a byte-order mark, CRLF line ends), and errors that name the line.
 */
import { describe, expect, it } from 'vitest';
import { parsePinMapCsv, parseRequiredFunction } from '@shared/checks/pin-map-csv';

describe('parsePinMapCsv', () => {
  it('reads comma-separated rows with the columns in any order and any case', () => {
    const result = parsePinMapCsv(
      'Signal,FUNCTION,Pin,Driven_At\nRELAY_EN,digital_out,D7,\nBATT_SENSE,analog in,A6,3.3\n',
    );
    expect(result.errors).toEqual([]);
    expect(result.rows).toEqual([
      { pin: 'D7', signal: 'RELAY_EN', function: 'digital_out' },
      { pin: 'A6', signal: 'BATT_SENSE', function: 'analog_in', drivenAtVolts: 3.3 },
    ]);
  });

  it('reads semicolon-separated rows, where the comma is the decimal mark', () => {
    const result = parsePinMapCsv('pin;signal;function;driven_at\nD2;RAIN_TIP;External interrupt;4,5\n');
    expect(result.errors).toEqual([]);
    expect(result.rows).toEqual([{ pin: 'D2', signal: 'RAIN_TIP', function: 'ext_interrupt', drivenAtVolts: 4.5 }]);
  });

  it('keeps separators, doubled quotes and line breaks inside quoted fields', () => {
    const text =
      'pin,signal,function\n"D5","Fan, tach ""A""",digital in\n"A4","SDA\nto the display",I2C SDA\nD9,LAMP,PWM\n';
    const result = parsePinMapCsv(text);
    expect(result.errors).toEqual([]);
    expect(result.rows).toEqual([
      { pin: 'D5', signal: 'Fan, tach "A"', function: 'digital_in' },
      { pin: 'A4', signal: 'SDA\nto the display', function: 'i2c_sda' },
      { pin: 'D9', signal: 'LAMP', function: 'pwm' },
    ]);
  });

  it('ignores a byte-order mark and reads CRLF line ends', () => {
    const result = parsePinMapCsv('\uFEFFpin,signal,function\r\nD13,LED,digital out\r\nD12,BUZZER,Digital out\r\n');
    expect(result.errors).toEqual([]);
    expect(result.rows.map((r) => [r.pin, r.function])).toEqual([
      ['D13', 'digital_out'],
      ['D12', 'digital_out'],
    ]);
  });

  it('reports an unknown function with its line and keeps the other rows', () => {
    const result = parsePinMapCsv('pin,signal,function\nD3,BEEPER,PWM\n\nD4,MOTOR,servo\nD6,LIGHT,digital out\n');
    expect(result.rows.map((r) => r.signal)).toEqual(['BEEPER', 'LIGHT']);
    expect(result.errors).toEqual([{ line: 4, message: 'Unknown function "servo".' }]);
  });

  it('counts lines inside a quoted field when it reports a later line', () => {
    const result = parsePinMapCsv('pin,signal,function\nD5,"two\nlines",digital in\nD8,,digital in\n');
    expect(result.errors).toEqual([{ line: 4, message: 'The signal is empty.' }]);
  });

  it('refuses a header without the signal column and names it', () => {
    const result = parsePinMapCsv('pin,function\nD7,digital out\n');
    expect(result.rows).toEqual([]);
    expect(result.errors).toHaveLength(1);
    expect(result.errors[0]!.line).toBe(1);
    expect(result.errors[0]!.message).toContain('"signal"');
  });

  it('says when a voltage is not a number', () => {
    const result = parsePinMapCsv('pin,signal,function,driven_at\nA0,PROBE,analog in,high\n');
    expect(result.errors).toEqual([{ line: 2, message: '"high" is not a voltage.' }]);
  });
});

describe('parseRequiredFunction', () => {
  it('accepts our codes and the readable names people type', () => {
    expect(parseRequiredFunction('uart_tx')).toBe('uart_tx');
    expect(parseRequiredFunction('I²C SCL')).toBe('i2c_scl');
    expect(parseRequiredFunction('i2c-scl')).toBe('i2c_scl');
    expect(parseRequiredFunction('Pin-change interrupt')).toBe('pin_change_interrupt');
    expect(parseRequiredFunction('stepper')).toBeUndefined();
  });
});
