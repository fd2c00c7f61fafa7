import { describe, expect, it } from 'vitest';
import { codeLexemes, codeTails, normalizeForSearch, normalizeVoltages, vocabularyOf } from '../../../shared/search/normalize';

describe('voltage spellings', () => {
  it.each([
    ['3.3V', '3v3'],
    ['3,3 V', '3v3'],
    ['3V3', '3v3'],
    ['3v3', '3v3'],
    ['5V', '5v'],
    ['5 V', '5v'],
    ['12V rail', '12v rail'],
    ['1.8V logic', '1v8 logic'],
  ])('%s becomes %s', (input, expected) => {
    expect(normalizeVoltages(input)).toBe(expected);
  });

  it('leaves versions, part numbers and other units alone', () => {
    expect(normalizeVoltages('v2.0.1, SN74HC14, 400 mA, 10 kΩ, Rev B')).toBe('v2.0.1, SN74HC14, 400 mA, 10 kΩ, Rev B');
    expect(normalizeVoltages('GPIO35 and 5VDC')).toBe('GPIO35 and 5VDC');
  });

  it('folds compatibility forms (full-width digits) before matching', () => {
    expect(normalizeForSearch('３.３V')).toBe('3v3');
  });
});

describe('component values', () => {
  it.each([
    ['4.7k', '4k7'],
    ['4k7', '4k7'],
    ['4.7 kΩ', '4k7'],
    ['4K7 ohm', '4k7'],
    ['10 kΩ', '10k'],
    ['2.2uF', '2u2f'],
    ['2.2 µF', '2u2f'],
  ])('%s becomes %s', (input, expected) => {
    expect(normalizeForSearch(input)).toBe(expected);
  });

  it('leaves plain numbers and other units alone', () => {
    expect(normalizeForSearch('400 mA, 97 %, 12 mm, 5 A')).toBe('400 mA, 97 %, 12 mm, 5 A');
  });
});

describe('part numbers and pin labels', () => {
  it('index their tails after letter/digit boundaries', () => {
    expect(codeTails('ATmega328P')).toEqual(['328p']);
    expect(codeTails('SN74HC14')).toEqual(['74hc14', 'hc14']);
    expect(codeTails('RP2040')).toEqual(['2040']);
  });

  it('skip tails too short or without a digit', () => {
    expect(codeTails('GPIO35')).toEqual([]);
    expect(codeTails('PD2')).toEqual([]);
    expect(codeTails('A6')).toEqual([]);
    expect(codeTails('relay')).toEqual([]);
  });

  it('collect codes from prose, normalized', () => {
    expect(codeLexemes('The ATmega328P drives GPIO35 at 3.3V via PD2.').sort()).toEqual(['328p', '3v3', 'atmega328p', 'gpio35', 'pd2'].sort());
  });

  it('keeps a vocabulary of codes and plain words for suggestions', () => {
    expect(vocabularyOf('Regulator runs hot on the ATmega328P board').sort()).toEqual(['atmega328p', 'board', 'regulator', 'runs'].sort());
  });
});
