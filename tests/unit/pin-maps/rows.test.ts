/**
 * Pin map rows in the table: a typed pin shown with its other names (ATmega328P TQFP-32: D7 is
 * PD7 on package pin 11), rows that cannot be saved named by position, and the erratum prefill
 * read back from history state only when it is well formed.
 */
import { describe, expect, it } from 'vitest';
import { prefillState, readErratumPrefill, type ErratumPrefill } from '@/components/pin-maps/erratum-prefill';
import { contractRows, describePin, editableRow } from '@/components/pin-maps/rows';
import { partPage } from './fixtures';

const atmega = partPage('atmega328p').profile;

describe('describePin', () => {
  it('shows the port name and package pin for a board label, and the other way round', () => {
    expect(describePin(atmega, 'D7')?.text).toBe('D7 → PD7, pin 11');
    expect(describePin(atmega, 'pd7')?.text).toBe('pd7 → D7, pin 11');
    expect(describePin(atmega, 'pin 11')?.text).toBe('pin 11 → D7, PD7');
  });

  it('says when the part has no such pin, and says nothing for an empty cell', () => {
    expect(describePin(atmega, 'D22')).toEqual({ pin: undefined, text: 'The ATmega328P has no pin “D22”' });
    expect(describePin(atmega, '  ')).toBeNull();
  });
});

describe('contractRows', () => {
  it('turns typed volts into numbers and names the rows that cannot be saved', () => {
    const result = contractRows([
      editableRow({ pin: 'D2', signal: 'RAIN', function: 'ext_interrupt' }),
      { ...editableRow({ pin: 'A0', signal: 'LEVEL', function: 'analog_in' }), drivenAt: '3,3 V' },
      { ...editableRow({ pin: '', signal: 'FAN' }) },
      { ...editableRow({ pin: 'D5', signal: 'PUMP' }), drivenAt: 'high' },
    ]);
    expect(result.rows).toEqual([
      { pin: 'D2', signal: 'RAIN', function: 'ext_interrupt' },
      { pin: 'A0', signal: 'LEVEL', function: 'analog_in', drivenAtVolts: 3.3 },
    ]);
    expect(result.problems).toEqual([
      { index: 2, field: 'pin', message: 'The pin is empty' },
      { index: 3, field: 'drivenAt', message: '“high” is not a voltage' },
    ]);
  });
});

describe('readErratumPrefill', () => {
  const prefill: ErratumPrefill = {
    title: 'RELAY_EN on A6 (ADC6): analog-input-only pin',
    category: 'pin-capability',
    severity: 'major',
    status: 'open',
    symptom: 'RELAY_EN does not work.',
    cause: 'A6 is analog only.',
    fix: 'Move RELAY_EN to D5.',
    parts: ['ATmega328P'],
    pins: ['A6 (ADC6)'],
    affected: [21],
  };

  it('reads back what the pin maps page put in the history state', () => {
    expect(readErratumPrefill({ back: '/x', position: 3, ...prefillState(prefill) })).toEqual(prefill);
  });

  it('ignores a state without a prefill or with a damaged one', () => {
    expect(readErratumPrefill(null)).toBeNull();
    expect(readErratumPrefill({ back: '/x' })).toBeNull();
    expect(readErratumPrefill(prefillState({ ...prefill, severity: 'dreadful' as never }))).toBeNull();
    expect(readErratumPrefill(prefillState({ ...prefill, affected: ['21' as never] }))).toBeNull();
  });
});
