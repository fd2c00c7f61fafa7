/**
 * Level-check margins against numbers worked by hand from the datasheet values in the reference
 * list. Each expectation carries its arithmetic; the sources are those of the profiles used:
 * ATmega328P Table 32-2 / 32-1 (Microchip DS40001984A), RP2040 Tables 624 / 621, 74HC TI SN74HC240
 * (SCLS128H) §4.2, 74HCT TI SN74HCT04 (SCLS042F) §5.2, LVCMOS/LVTTL JESD8C (corroborated),
 * ESP32 module datasheet Table 6 (corroborated), 5 V TTL TI SN7400, 1.8 V JESD8-7 (corroborated).
 */
import { describe, expect, it } from 'vitest';
import { loadPartProfiles } from '../../../db/parts/load';
import type { PartProfile } from '../../../shared/contracts/parts';
import { checkLevels, LevelCheckError, MARGINAL_BELOW_VOLTS } from '../../../shared/checks/levels';

const profiles = loadPartProfiles();
const part = (slug: string): PartProfile => profiles.find((p) => p.slug === slug)!;
const at = (slug: string, supplyVolts: number) => ({ profile: part(slug), supplyVolts });

describe('checkLevels', () => {
  it('ATmega328P at 5 V driving 74HC at 4.5 V: ok', () => {
    const result = checkLevels({ driver: at('atmega328p', 5), receiver: at('74hc', 4.5) });
    // NM_high = VOH 4.2 V (Table 32-2, −20 mA) − VIH 3.15 V (SCLS128H) = 1.05 V
    expect(result.noiseMarginHigh).toBeCloseTo(1.05, 3);
    // NM_low = VIL 1.35 V − VOL 0.9 V (20 mA) = 0.45 V ≥ 0.4 V
    expect(result.noiseMarginLow).toBeCloseTo(0.45, 3);
    // Overvoltage: 5 V against 74HC VCC + 0.5 V = 4.5 + 0.5 = 5.0 V (from memory): not above it.
    expect(result.overvoltage).toMatchObject({ exceeds: false, limitVolts: 5, drivenVolts: 5 });
    expect(result.verdict).toBe('ok');
    expect(result.numbers.vih.source.document).toMatch(/SN74HC240/);
    expect(result.numbers.voh.testCurrent?.milliamps).toBe(20);
  });

  it('3.3 V LVCMOS into 74HC at 4.5 V fails: the high margin is negative', () => {
    const result = checkLevels({ driver: at('lvcmos-3v3', 3.3), receiver: at('74hc', 4.5) });
    // VOH = VDD − 0.2 = 3.3 − 0.2 = 3.1 V; NM_high = 3.1 − 3.15 = −0.05 V
    expect(result.numbers.voh.volts).toBeCloseTo(3.1, 3);
    expect(result.noiseMarginHigh).toBeCloseTo(-0.05, 3);
    // NM_low = 1.35 − 0.2 = 1.15 V
    expect(result.noiseMarginLow).toBeCloseTo(1.15, 3);
    expect(result.verdict).toBe('fails');
  });

  it('3.3 V LVCMOS into 74HC at 5 V fails, and says the 74HC row is specified at 4.5 V', () => {
    const result = checkLevels({ driver: at('lvcmos-3v3', 3.3), receiver: at('74hc', 5) });
    // Only the 4.5 V row is on file (3.15 V); at 5 V the real VIH is higher still, so −0.05 V is optimistic.
    expect(result.noiseMarginHigh).toBeCloseTo(-0.05, 3);
    expect(result.numbers.vih.extrapolated).toBe(true);
    expect(result.verdict).toBe('fails');
    expect(result.messages.join(' ')).toMatch(/specified at 4\.5 V, not at 5 V/);
  });

  it('3.3 V LVCMOS into 74HCT at 5 V: ok', () => {
    const result = checkLevels({ driver: at('lvcmos-3v3', 3.3), receiver: at('74hct', 5) });
    // NM_high = 3.1 − 2.0 = 1.1 V; NM_low = 0.8 − 0.2 = 0.6 V
    expect(result.noiseMarginHigh).toBeCloseTo(1.1, 3);
    expect(result.noiseMarginLow).toBeCloseTo(0.6, 3);
    // Overvoltage: 3.3 V ≤ 5 + 0.5 = 5.5 V
    expect(result.overvoltage.exceeds).toBe(false);
    expect(result.verdict).toBe('ok');
  });

  it('5 V ATmega328P into RP2040 at 3.3 V fails on overvoltage (and on the low margin)', () => {
    const result = checkLevels({ driver: at('atmega328p', 5), receiver: at('rp2040', 3.3) });
    // NM_high = 4.2 − 2.0 = 2.2 V; NM_low = 0.8 − 0.9 = −0.1 V
    expect(result.noiseMarginHigh).toBeCloseTo(2.2, 3);
    expect(result.noiseMarginLow).toBeCloseTo(-0.1, 3);
    // Limit IOVDD + 0.5 = 3.3 + 0.5 = 3.8 V < 5 V driven
    expect(result.overvoltage).toMatchObject({ exceeds: true, limitVolts: 3.8, drivenVolts: 5, tolerant: false });
    expect(result.overvoltage.source?.section).toMatch(/Table 621/);
    expect(result.verdict).toBe('fails');
  });

  it('RP2040 at 3.3 V into ATmega328P at 5 V fails: 2.62 V is below 0.6·VCC', () => {
    const result = checkLevels({ driver: at('rp2040', 3.3), receiver: at('atmega328p', 5) });
    // VIH = 0.6 × 5 = 3.0 V; NM_high = 2.62 − 3.0 = −0.38 V
    expect(result.numbers.vih.volts).toBeCloseTo(3.0, 3);
    expect(result.noiseMarginHigh).toBeCloseTo(-0.38, 3);
    // VIL = 0.3 × 5 = 1.5 V; NM_low = 1.5 − 0.5 = 1.0 V
    expect(result.noiseMarginLow).toBeCloseTo(1.0, 3);
    expect(result.overvoltage.exceeds).toBe(false);
    expect(result.verdict).toBe('fails');
  });

  it('RP2040 at 3.3 V into 74HCT at 5 V is marginal: low margin 0.3 V', () => {
    const result = checkLevels({ driver: at('rp2040', 3.3), receiver: at('74hct', 5) });
    // NM_high = 2.62 − 2.0 = 0.62 V; NM_low = 0.8 − 0.5 = 0.3 V, ≥ 0 but < 0.4 V
    expect(result.noiseMarginHigh).toBeCloseTo(0.62, 3);
    expect(result.noiseMarginLow).toBeCloseTo(0.3, 3);
    expect(result.verdict).toBe('marginal');
  });

  it('ESP32 at 3.3 V into ATmega328P at 3.3 V: ok, thresholds computed at 3.3 V', () => {
    const result = checkLevels({ driver: at('esp32', 3.3), receiver: at('atmega328p', 3.3) });
    // VOH = 0.8 × 3.3 = 2.64 V; VIH = 0.6 × 3.3 = 1.98 V; NM_high = 0.66 V
    expect(result.numbers.voh.volts).toBeCloseTo(2.64, 3);
    expect(result.numbers.vih.volts).toBeCloseTo(1.98, 3);
    expect(result.noiseMarginHigh).toBeCloseTo(0.66, 3);
    // VIL = 0.3 × 3.3 = 0.99 V; VOL = 0.1 × 3.3 = 0.33 V; NM_low = 0.66 V
    expect(result.noiseMarginLow).toBeCloseTo(0.66, 3);
    // Limit VCC + 0.5 = 3.8 V ≥ 3.3 V
    expect(result.overvoltage).toMatchObject({ exceeds: false, limitVolts: 3.8 });
    expect(result.verdict).toBe('ok');
  });

  it('3.3 V LVTTL into ESP32 fails: 2.4 V is below 0.75·VDD', () => {
    const result = checkLevels({ driver: at('lvttl-3v3', 3.3), receiver: at('esp32', 3.3) });
    // VIH = 0.75 × 3.3 = 2.475 V; NM_high = 2.4 − 2.475 = −0.075 V
    expect(result.noiseMarginHigh).toBeCloseTo(-0.075, 3);
    // VIL = 0.25 × 3.3 = 0.825 V; NM_low = 0.825 − 0.4 = 0.425 V
    expect(result.noiseMarginLow).toBeCloseTo(0.425, 3);
    expect(result.verdict).toBe('fails');
  });

  it('5 V TTL into 74HC fails; into 74HCT it is ok at exactly 0.4 V', () => {
    // TTL → HC: NM_high = 2.4 − 3.15 = −0.75 V
    expect(checkLevels({ driver: at('ttl-5v', 5), receiver: at('74hc', 4.5) }).noiseMarginHigh).toBeCloseTo(-0.75, 3);
    // TTL → HCT: NM_high = 2.4 − 2.0 = 0.4 V; NM_low = 0.8 − 0.4 = 0.4 V; 0.4 is not below 0.4
    const hct = checkLevels({ driver: at('ttl-5v', 5), receiver: at('74hct', 5) });
    expect(hct.noiseMarginHigh).toBe(0.4);
    expect(hct.noiseMarginLow).toBe(0.4);
    expect(hct.verdict).toBe('ok');
    expect(MARGINAL_BELOW_VOLTS).toBe(0.4);
    expect(hct.marginalSource.confidence).toBe('common_practice');
  });

  it('74HC at 4.5 V into RP2040 fails on overvoltage only', () => {
    const result = checkLevels({ driver: at('74hc', 4.5), receiver: at('rp2040', 3.3) });
    // NM_high = 4.4 − 2.0 = 2.4 V; NM_low = 0.8 − 0.1 = 0.7 V; 4.5 V > 3.8 V
    expect(result.noiseMarginHigh).toBeCloseTo(2.4, 3);
    expect(result.noiseMarginLow).toBeCloseTo(0.7, 3);
    expect(result.overvoltage).toMatchObject({ exceeds: true, limitVolts: 3.8, drivenVolts: 4.5 });
    expect(result.verdict).toBe('fails');
  });

  it('1.8 V CMOS into 3.3 V LVCMOS fails', () => {
    const result = checkLevels({ driver: at('cmos-1v8', 1.8), receiver: at('lvcmos-3v3', 3.3) });
    // VOH = 1.8 − 0.45 = 1.35 V; NM_high = 1.35 − 2.0 = −0.65 V; NM_low = 0.8 − 0.45 = 0.35 V
    expect(result.noiseMarginHigh).toBeCloseTo(-0.65, 3);
    expect(result.noiseMarginLow).toBeCloseTo(0.35, 3);
    expect(result.verdict).toBe('fails');
  });

  it('ATmega328P at 3 V into RP2040 is marginal on both margins (3 V row: VOH 2.3 V, VOL 0.6 V at 10 mA)', () => {
    const result = checkLevels({ driver: at('atmega328p', 3), receiver: at('rp2040', 3.3) });
    // NM_high = 2.3 − 2.0 = 0.3 V; NM_low = 0.8 − 0.6 = 0.2 V
    expect(result.noiseMarginHigh).toBeCloseTo(0.3, 3);
    expect(result.noiseMarginLow).toBeCloseTo(0.2, 3);
    expect(result.numbers.voh.testCurrent?.milliamps).toBe(10);
    expect(result.verdict).toBe('marginal');
  });

  it('RP2040 at 3.0 V uses its 3.3 V row but caps the verdict at marginal', () => {
    const result = checkLevels({ driver: at('rp2040', 3), receiver: at('atmega328p', 3) });
    // VIH = 0.6 × 3 = 1.8 V; NM_high = 2.62 − 1.8 = 0.82 V; VIL = 0.9 V; NM_low = 0.9 − 0.5 = 0.4 V
    expect(result.noiseMarginHigh).toBeCloseTo(0.82, 3);
    expect(result.noiseMarginLow).toBeCloseTo(0.4, 3);
    expect(result.numbers.voh.extrapolated).toBe(true);
    expect(result.verdict).toBe('marginal');
  });

  it("a supply outside the part's range fails", () => {
    // RP2040 IOVDD max 3.63 V
    const result = checkLevels({ driver: at('rp2040', 5), receiver: at('74hct', 5) });
    expect(result.verdict).toBe('fails');
    expect(result.messages.join(' ')).toMatch(/outside the RP2040's supply range of 1\.62–3\.63 V/);
  });

  it('says so when a part has no output levels on file (74HCT outputs are not in the reference list)', () => {
    expect(() => checkLevels({ driver: at('74hct', 5), receiver: at('atmega328p', 5) })).toThrow(LevelCheckError);
  });
});
