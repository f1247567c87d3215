/** Boiling point of the coolant mix: IAPWS-IF97 water saturation with Raoult's law for the glycol (ideal solution). */
import { boilingMarginC, boilingPointC } from '../../shared/coolant/boiling-point';
import { KPA_PER_PSI } from '../../shared/units';

describe('pure water', () => {
  it('0 kPa gauge (101.325 kPa absolute): 99.97 °C, IAPWS-IF97 Tsat(0.101325 MPa) = 373.124 K', () => {
    expect(boilingPointC(0, 'ethylene', 0, 'volume')).toBeCloseTo(99.974, 3);
  });
  it('at 0.1 MPa absolute (-1.325 kPa gauge): IAPWS-IF97 check value 372.755919 K', () => {
    expect(boilingPointC(-1.325, 'propylene', 0, 'mass') + 273.15).toBeCloseTo(372.755919, 5);
  });
  it('at 1 MPa absolute: IAPWS-IF97 check value 453.035632 K', () => {
    expect(boilingPointC(1000 - 101.325, 'ethylene', 0, 'mass') + 273.15).toBeCloseTo(453.035632, 5);
  });
  it('a barometric pressure other than standard shifts the boiling point (90 kPa: IAPWS-IF97 96.7 °C)', () => {
    // Saturated-water table at 90 kPa: 96.69 °C (Cengel & Boles, Thermodynamics, table A-5; recalled from memory)
    expect(boilingPointC(0, 'ethylene', 0, 'volume', 90)).toBeCloseTo(96.69, 1);
  });
});

describe('cap pressure rule of thumb: about 1.5 °C per psi (common practice)', () => {
  it.each([7, 10, 15])('water at a %d psi cap: 1.5 °C/psi within 0.3', (psi) => {
    const rise = boilingPointC(psi * KPA_PER_PSI, 'ethylene', 0, 'volume') - boilingPointC(0, 'ethylene', 0, 'volume');
    expect(Math.abs(rise / psi - 1.5)).toBeLessThan(0.3);
  });
  it('50 vol % EG at a 15 psi cap: 1.5 °C/psi within 0.3', () => {
    const rise = boilingPointC(15 * KPA_PER_PSI, 'ethylene', 50, 'volume') - boilingPointC(0, 'ethylene', 50, 'volume');
    expect(Math.abs(rise / 15 - 1.5)).toBeLessThan(0.3);
  });
});

describe('glycol raises the boiling point (Raoult, ideal solution, glycol vapour pressure neglected)', () => {
  // Published: 50 % ethylene glycol coolant boils at about 106-107 °C (223-225 °F) at 1 atm and about 129 °C (265 °F)
  // under a 15 psi cap, as quoted in coolant makers' literature. Recalled from memory; tolerance 2 °C for the ideal-solution model.
  it('50 vol % EG at 1 atm: about 107 °C (225 °F) within 2 °C (from memory)', () => {
    expect(Math.abs(boilingPointC(0, 'ethylene', 50, 'volume') - 107)).toBeLessThan(2);
  });
  it('50 vol % EG under a 15 psi cap: about 129 °C (265 °F) within 2 °C (from memory)', () => {
    expect(Math.abs(boilingPointC(15 * KPA_PER_PSI, 'ethylene', 50, 'volume') - 129.4)).toBeLessThan(2);
  });
  it('Raoult by hand: 50 mass % EG, x_w = 0.77504, water must reach 101.325/0.77504 = 130.74 kPa: IF97 Tsat = 107.27 °C', () => {
    expect(boilingPointC(0, 'ethylene', 50, 'mass')).toBeCloseTo(107.27, 1);
  });
  it('more glycol, higher boiling point; PG (heavier molecule) raises it less than EG at the same mass %', () => {
    const eg = [0, 20, 40, 60].map((p) => boilingPointC(0, 'ethylene', p, 'mass'));
    for (let i = 1; i < eg.length; i++) expect(eg[i]).toBeGreaterThan(eg[i - 1]);
    expect(boilingPointC(0, 'propylene', 50, 'mass')).toBeLessThan(boilingPointC(0, 'ethylene', 50, 'mass'));
  });
});

describe('boiling margin', () => {
  it('= boiling point at the present pressure minus the coolant temperature', () => {
    const bp = boilingPointC(90, 'ethylene', 50, 'volume');
    expect(boilingMarginC(95, 90, 'ethylene', 50, 'volume')).toBeCloseTo(bp - 95, 10);
  });
  it('pure water at 0 kPa gauge and 100 °C is (just) past boiling: margin below zero', () => {
    expect(boilingMarginC(100, 0, 'ethylene', 0, 'volume')).toBeLessThan(0);
  });
  it('losing cap pressure shrinks the margin', () => {
    expect(boilingMarginC(110, 0, 'ethylene', 50, 'volume')).toBeLessThan(boilingMarginC(110, 100, 'ethylene', 50, 'volume'));
  });
});

describe('bad input -> RangeError naming the field', () => {
  it.each([
    [() => boilingPointC(Number.NaN, 'ethylene', 50, 'volume'), /gaugeKpa/],
    [() => boilingPointC(-150, 'ethylene', 50, 'volume'), /gaugeKpa/],
    [() => boilingPointC(50000, 'ethylene', 50, 'volume'), /gaugeKpa/],
    [() => boilingPointC(0, 'ethylene', 95, 'volume'), /percent/],
    [() => boilingPointC(0, 'ethylene', -5, 'volume'), /percent/],
    [() => boilingPointC(0, 'brine' as never, 50, 'volume'), /glycol/],
    [() => boilingPointC(0, 'ethylene', 50, 'volume', 5), /atmosphereKpa/],
    [() => boilingMarginC(Number.POSITIVE_INFINITY, 0, 'ethylene', 50, 'volume'), /coolantTempC/],
  ])('case %#', (fn, re) => {
    expect(fn).toThrow(RangeError);
    expect(fn).toThrow(re);
  });
});
