/**
 * shared/units.ts against NIST Special Publication 811 (2008 ed.), "Guide for the Use of the International
 * System of Units", Appendix B (B.8 and B.9 conversion factors) and section 4 (SI prefixes).
 */
import {
  cToF,
  deltaCToF,
  deltaFToC,
  fromCelsius,
  fromKpa,
  fToC,
  gallonsToLitres,
  gaugeToAbsoluteKpa,
  KPA_PER_ATM,
  KPA_PER_BAR,
  KPA_PER_PSI,
  LITRES_PER_US_GALLON,
  LITRES_PER_US_PINT,
  litresToGallons,
  toCelsius,
  toKpa,
  toMicroSiemens,
} from '../../shared/units';

describe('volume factors (NIST SP 811 Appendix B.8)', () => {
  it('gallon (U.S.) = 3.785 411 784 E-03 m3 exactly', () => {
    expect(LITRES_PER_US_GALLON).toBe(3.785411784);
    expect(gallonsToLitres(1)).toBe(3.785411784);
    expect(litresToGallons(3.785411784)).toBeCloseTo(1, 12);
  });
  it('pint (U.S. liquid) = 4.731 765 E-04 m3 (exactly 1/8 gallon)', () => {
    expect(LITRES_PER_US_PINT).toBeCloseTo(0.4731765, 7);
    expect(LITRES_PER_US_PINT * 8).toBeCloseTo(LITRES_PER_US_GALLON, 12);
  });
  it('round trip of a typical 60.6 L system is lossless to 1e-12', () => {
    expect(gallonsToLitres(litresToGallons(60.6))).toBeCloseTo(60.6, 12);
  });
});

describe('pressure factors (NIST SP 811 Appendix B.8)', () => {
  it('pound-force per square inch = 6.894 757 E+03 Pa', () => {
    expect(KPA_PER_PSI).toBeCloseTo(6.894757, 6);
    expect(toKpa(1, 'psi')).toBeCloseTo(6.894757, 6);
    expect(toKpa(15, 'psi')).toBeCloseTo(103.4214, 4);
  });
  it('psi from the exact definitions lbf = 4.448 221 615 260 5 N and in = 0.0254 m (SP 811 B.8)', () => {
    expect(KPA_PER_PSI).toBeCloseTo(4.4482216152605 / (0.0254 * 0.0254) / 1000, 12);
  });
  it('bar = 1.0 E+05 Pa exactly; standard atmosphere = 1.013 25 E+05 Pa exactly', () => {
    expect(KPA_PER_BAR).toBe(100);
    expect(toKpa(1.5, 'bar')).toBe(150);
    expect(KPA_PER_ATM).toBe(101.325);
  });
  it('fromKpa inverts toKpa for every unit', () => {
    for (const u of ['kPa', 'psi', 'bar'] as const) expect(fromKpa(toKpa(7.3, u), u)).toBeCloseTo(7.3, 12);
    expect(fromKpa(101.325, 'psi')).toBeCloseTo(14.69595, 5); // 1 atm = 14.695 95 psi (SP 811 factors combined)
  });
  it('absolute = gauge + standard atmosphere (SP 811: atmosphere, standard = 101 325 Pa)', () => {
    expect(gaugeToAbsoluteKpa(0)).toBe(101.325);
    expect(gaugeToAbsoluteKpa(100)).toBeCloseTo(201.325, 12);
    expect(gaugeToAbsoluteKpa(10, 95)).toBe(105);
  });
});

describe('temperature (NIST SP 811 B.9: t/°C = (t/°F - 32)/1.8; T/K = t/°C + 273.15)', () => {
  it('fixed points', () => {
    expect(cToF(0)).toBe(32);
    expect(cToF(100)).toBe(212);
    expect(cToF(-40)).toBe(-40);
    expect(fToC(212)).toBe(100);
    expect(fToC(98.6)).toBeCloseTo(37, 12);
  });
  it('kelvin', () => {
    expect(toCelsius(273.15, 'K')).toBe(0);
    expect(fromCelsius(99.97, 'K')).toBeCloseTo(373.12, 10);
    expect(toCelsius(32, 'degF')).toBe(0);
    expect(fromCelsius(50, 'degF')).toBe(122);
    expect(toCelsius(12.5, 'degC')).toBe(12.5);
  });
  it('temperature intervals: 1 °C interval = 1.8 °F interval (SP 811 B.9, no offset)', () => {
    expect(deltaCToF(10)).toBe(18);
    expect(deltaFToC(9)).toBe(5);
    expect(deltaFToC(deltaCToF(3.3))).toBeCloseTo(3.3, 12);
  });
});

describe('conductivity (SI prefixes, NIST SP 811 section 4: milli = 1e-3, micro = 1e-6)', () => {
  it('1 mS/cm = 1000 µS/cm', () => {
    expect(toMicroSiemens(1.2, 'mS/cm')).toBeCloseTo(1200, 10);
    expect(toMicroSiemens(850, 'uS/cm')).toBe(850);
  });
});
