/**
 * RC debounce helper against Texas Instruments "Debounce a Switch" (SCEA094, Oct 2020): 10 kΩ with
 * 0.1 µF gives τ = 1 ms. Derived values are worked by hand from the time-constant equations
 * (Lessons in Electric Circuits, EE Reference ch. 1): f_c = 1/(2πRC), t_charge = −RC·ln(1 − Vth/V),
 * t_discharge = −RC·ln(Vth/V). Natural logs used: ln 0.4 = −0.916291, ln 0.3 = −1.203973,
 * ln 0.6 = −0.510826, ln 0.16 = −1.832581, ln 0.25 = −1.386294.
 */
import { describe, expect, it } from 'vitest';
import { chargeTime, cutoffFrequency, dischargeTime, rcDebounce, timeConstant } from '../../../shared/checks/rc';

const R = 10_000; // 10 kΩ
const C = 0.1e-6; // 0.1 µF

describe('RC debounce (TI SCEA094 worked example)', () => {
  it('τ = 10 kΩ × 0.1 µF = 1 ms', () => {
    expect(timeConstant(R, C)).toBeCloseTo(1e-3, 12);
  });

  it('f_c = 1 / (2π × 1 ms) ≈ 159.15 Hz', () => {
    // 1 / 0.00628319 = 159.155
    expect(cutoffFrequency(R, C)).toBeCloseTo(159.155, 2);
  });

  it('charging to 0.6·VCC takes −1 ms × ln(0.4) ≈ 0.916 ms', () => {
    expect(chargeTime(R, C, 5, 3)).toBeCloseTo(0.916291e-3, 8);
  });

  it('discharging to 0.3·VCC takes −1 ms × ln(0.3) ≈ 1.204 ms', () => {
    expect(dischargeTime(R, C, 5, 1.5)).toBeCloseTo(1.203973e-3, 8);
  });

  it("uses the receiver's thresholds at its supply: ATmega328P 0.6·VCC / 0.3·VCC (Table 32-2) at 3.3 V", () => {
    const result = rcDebounce({
      ohms: R,
      farads: C,
      supplyVolts: 3.3,
      vih: { kind: 'fraction_of_supply', fraction: 0.6 },
      vil: { kind: 'fraction_of_supply', fraction: 0.3 },
    });
    // VIH = 1.98 V, VIL = 0.99 V: the ratios are 0.6 and 0.3 whatever the supply.
    expect(result.vihVolts).toBeCloseTo(1.98, 9);
    expect(result.vilVolts).toBeCloseTo(0.99, 9);
    expect(result.riseToVihSeconds).toBeCloseTo(0.916291e-3, 8);
    expect(result.fallToVilSeconds).toBeCloseTo(1.203973e-3, 8);
    expect(result.tauSeconds).toBeCloseTo(1e-3, 12);
    expect(result.working[0]).toMatch(/τ = R·C/);
  });

  it('absolute thresholds: 74HCT VIH 2.0 V / VIL 0.8 V (SCLS042F §5.2) at 5 V', () => {
    const result = rcDebounce({
      ohms: R,
      farads: C,
      supplyVolts: 5,
      vih: { kind: 'volts', volts: 2.0 },
      vil: { kind: 'volts', volts: 0.8 },
    });
    // rise: −1 ms × ln(1 − 2/5) = −1 ms × ln 0.6 = 0.510826 ms
    expect(result.riseToVihSeconds).toBeCloseTo(0.510826e-3, 8);
    // fall: −1 ms × ln(0.8/5) = −1 ms × ln 0.16 = 1.832581 ms
    expect(result.fallToVilSeconds).toBeCloseTo(1.832581e-3, 8);
  });

  it('scales with RC: 100 kΩ × 0.1 µF = 10 ms; to VIH 0.75·VDD (ESP32, corroborated) −10 ms × ln 0.25 ≈ 13.86 ms', () => {
    expect(chargeTime(100_000, C, 3.3, 0.75 * 3.3)).toBeCloseTo(13.86294e-3, 7);
  });

  it('refuses thresholds the exponential never reaches, and non-positive parts', () => {
    expect(() => chargeTime(R, C, 5, 5)).toThrow(RangeError);
    expect(() => dischargeTime(R, C, 5, 0)).toThrow(RangeError);
    expect(() => timeConstant(0, C)).toThrow(RangeError);
    expect(() => timeConstant(R, -1)).toThrow(RangeError);
  });
});
