/** IAPWS-IF97 region 4 against the release's own computer-program check values (IAPWS R7-97(2012), tables 35 and 36). */
import { saturationPressureMPa, saturationTemperatureK, SATURATION_P_MAX_MPA } from '../../shared/coolant/water-saturation';

const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);

describe('saturationPressureMPa (IAPWS-IF97 table 35)', () => {
  it.each([
    [300, 0.353658941e-2],
    [500, 0.263889776e1],
    [600, 0.123443146e2],
  ])('Psat(%d K) = %f MPa to 1e-8 relative', (T, p) => {
    expect(rel(saturationPressureMPa(T), p)).toBeLessThan(1e-8);
  });
  it('triple-point end: Psat(273.15 K) = 611.213 Pa (IAPWS-IF97 range of region 4)', () => {
    expect(saturationPressureMPa(273.15) * 1e6).toBeCloseTo(611.213, 3);
  });
  it('critical end: Psat(647.096 K) = 22.064 MPa (IAPWS-IF97 critical point)', () => {
    expect(rel(saturationPressureMPa(647.096), 22.064)).toBeLessThan(1e-8);
  });
});

describe('saturationTemperatureK (IAPWS-IF97 table 36)', () => {
  it.each([
    [0.1, 0.372755919e3],
    [1, 0.453035632e3],
    [10, 0.584149488e3],
  ])('Tsat(%f MPa) = %f K to 1e-8 relative', (p, T) => {
    expect(rel(saturationTemperatureK(p), T)).toBeLessThan(1e-8);
  });
  it('normal boiling point of water: 99.974 °C at 101.325 kPa (IAPWS-IF97 eq. 31; IAPWS-95 gives 373.124 K, recalled from memory)', () => {
    expect(saturationTemperatureK(0.101325) - 273.15).toBeCloseTo(99.974, 3);
  });
  it('backward and forward equations agree to 1e-6 relative across the range (IAPWS-IF97 states consistency of eqs. 30 and 31)', () => {
    for (let T = 273.15; T <= 647; T += 7.3) {
      expect(rel(saturationTemperatureK(saturationPressureMPa(T)), T)).toBeLessThan(1e-6);
    }
    expect(rel(saturationTemperatureK(SATURATION_P_MAX_MPA), 647.096)).toBeLessThan(1e-6);
  });
});

describe('validity range (IAPWS-IF97 region 4: 273.15 K to 647.096 K)', () => {
  it('throws RangeError naming the field outside it', () => {
    expect(() => saturationPressureMPa(273.0)).toThrow(RangeError);
    expect(() => saturationPressureMPa(700)).toThrow(/TK/);
    expect(() => saturationPressureMPa(Number.NaN)).toThrow(/TK/);
    expect(() => saturationTemperatureK(0.0005)).toThrow(/pMPa/);
    expect(() => saturationTemperatureK(23)).toThrow(RangeError);
    expect(() => saturationTemperatureK(Number.POSITIVE_INFINITY)).toThrow(/pMPa/);
  });
});
