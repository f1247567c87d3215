/**
 * SCA decision. Limits 1.2 to 3.0 units per US gallon, the dose of one US pint per 4 US gallons, charged vs blank
 * filter and "strips do not apply to extended-life coolant" are common practice of the trade (defaults, overridable).
 * Volume factors: NIST SP 811 Appendix B (1 US gal = 3.785411784 L, 1 US pint = 0.473176473 L).
 */
import {
  decideAdditive,
  initialChargeAfterRefill,
  MIN_PRACTICAL_DOSE_L,
  practicalDose,
  unitsPerGalToPerLitre,
  unitsPerLitreToPerGal,
} from '../../shared/coolant/additive';

const conv = (scaUnitsPerGal: number, capacityL = 60.6) => decideAdditive({ coolantFamily: 'conventional', scaUnitsPerGal, capacityL });

describe('conventional coolant around the 1.2 boundary (common practice)', () => {
  it('1.19 -> low: charged filter and liquid additive', () => {
    const d = conv(1.19);
    expect(d.status).toBe('low');
    expect(d.filter).toBe('charged');
    expect(d.liquidAdditiveL).toBeGreaterThan(0);
    expect(d.reasons.join(' ')).toMatch(/charged/);
  });
  it('1.2 exactly -> in range', () => {
    expect(conv(1.2).status).toBe('in-range');
    expect(conv(1.2).liquidAdditiveL).toBe(0);
  });
  it('1.21 -> in range, keep charged filters at each oil-drain interval', () => {
    const d = conv(1.21);
    expect(d.status).toBe('in-range');
    expect(d.filter).toBe('charged');
    expect(d.reasons.join(' ')).toMatch(/oil-drain interval/);
  });
  it('0 units -> low', () => {
    expect(conv(0).status).toBe('low');
  });
});

describe('conventional coolant around the 3.0 boundary (common practice)', () => {
  it('2.99 and 3.0 -> in range', () => {
    expect(conv(2.99).status).toBe('in-range');
    expect(conv(3.0).status).toBe('in-range');
  });
  it('3.01 -> high: blank filter, no liquid, test again at next service', () => {
    const d = conv(3.01);
    expect(d.status).toBe('high');
    expect(d.filter).toBe('blank');
    expect(d.liquidAdditiveL).toBe(0);
    expect(d.reasons.join(' ')).toMatch(/next service/);
  });
  it('the upper limit can be set to 3.3 (also met in practice): 3.2 in range, 3.31 high', () => {
    const limits = { high: 3.3 };
    expect(decideAdditive({ coolantFamily: 'conventional', scaUnitsPerGal: 3.2, capacityL: 60, limits }).status).toBe('in-range');
    expect(decideAdditive({ coolantFamily: 'conventional', scaUnitsPerGal: 3.31, capacityL: 60, limits }).status).toBe('high');
  });
  it('a raised lower limit moves the low boundary', () => {
    expect(decideAdditive({ coolantFamily: 'conventional', scaUnitsPerGal: 1.4, capacityL: 60, limits: { low: 1.5 } }).status).toBe('low');
  });
});

describe('extended-life coolant: strips are not valid (common practice)', () => {
  it.each([0.5, 1.2, 2.0, 3.0, 4.0])('%f units -> not applicable, no filter choice, defer to maker or lab', (u) => {
    const d = decideAdditive({ coolantFamily: 'extended-life', scaUnitsPerGal: u, capacityL: 60 });
    expect(d.status).toBe('not-applicable');
    expect(d.filter).toBeNull();
    expect(d.liquidAdditiveL).toBe(0);
    expect(d.reasons.join(' ')).toMatch(/laboratory/);
    expect(d.reasons.join(' ')).toMatch(/maker/);
  });
  it('no reading at all is fine for extended-life coolant', () => {
    const d = decideAdditive({ coolantFamily: 'extended-life', scaUnitsPerGal: null, capacityL: 60 });
    expect(d.status).toBe('not-applicable');
    expect(d.scaUnitsPerLitre).toBeNull();
  });
});

describe('dose when low: one US pint per 4 US gallons (common practice)', () => {
  it('60.6 L = 16.0 US gal -> 4 pints = 1.89 L (NIST SP 811 factors), rounded to 0.05 L', () => {
    const d = conv(0.8, 60.6);
    // 60.6 / 3.785411784 = 16.009 gal; / 4 = 4.002 pints; x 0.473176473 = 1.894 L -> 1.90 L at 0.05 L steps
    expect(d.liquidAdditiveL).toBeCloseTo(1.9, 10);
    expect(Math.abs(d.liquidAdditiveL - 1.89)).toBeLessThanOrEqual(0.025);
    expect(d.liquidAdditiveUsPints).toBeCloseTo(4.0, 1);
  });
  it('15.1 L (4 US gal) -> 1 pint = 0.47 L -> 0.45 L at 0.05 L steps', () => {
    expect(conv(1.0, 15.14).liquidAdditiveL).toBeCloseTo(0.45, 10);
  });
  it('scales with capacity: 378.5 L (100 US gal) -> 25 pints = 11.83 L', () => {
    expect(conv(0.5, 378.5411784).liquidAdditiveL).toBeCloseTo(11.85, 10);
  });
});

describe('units per litre shown beside units per gallon (/3.785411784, NIST SP 811)', () => {
  it('1.2 units/gal = 0.317 units/L; 3.0 units/gal = 0.793 units/L', () => {
    expect(conv(1.2).scaUnitsPerLitre).toBeCloseTo(0.31701, 5);
    expect(unitsPerGalToPerLitre(3.0)).toBeCloseTo(0.79252, 5);
    expect(unitsPerLitreToPerGal(unitsPerGalToPerLitre(2.2))).toBeCloseTo(2.2, 12);
  });
});

describe('bad input -> RangeError naming the field', () => {
  it.each([
    [{ coolantFamily: 'conventional', scaUnitsPerGal: -0.1, capacityL: 60 }, /scaUnitsPerGal/],
    [{ coolantFamily: 'conventional', scaUnitsPerGal: Number.NaN, capacityL: 60 }, /scaUnitsPerGal/],
    [{ coolantFamily: 'conventional', scaUnitsPerGal: null, capacityL: 60 }, /scaUnitsPerGal/],
    [{ coolantFamily: 'conventional', scaUnitsPerGal: 2, capacityL: 0 }, /capacityL/],
    [{ coolantFamily: 'conventional', scaUnitsPerGal: 2, capacityL: -5 }, /capacityL/],
    [{ coolantFamily: 'conventional', scaUnitsPerGal: 2, capacityL: 10001 }, /capacityL/],
    [{ coolantFamily: 'conventional', scaUnitsPerGal: 2, capacityL: Number.POSITIVE_INFINITY }, /capacityL/],
    [{ coolantFamily: 'hybrid', scaUnitsPerGal: 2, capacityL: 60 }, /coolantFamily/],
    [{ coolantFamily: 'conventional', scaUnitsPerGal: 2, capacityL: 60, limits: { low: 3, high: 2 } }, /limits\.high/],
    [{ coolantFamily: 'conventional', scaUnitsPerGal: 2, capacityL: 60, limits: { low: -1 } }, /limits\.low/],
    [{ coolantFamily: 'extended-life', scaUnitsPerGal: -3, capacityL: 60 }, /scaUnitsPerGal/],
  ])('case %#', (input, re) => {
    expect(() => decideAdditive(input as never)).toThrow(RangeError);
    expect(() => decideAdditive(input as never)).toThrow(re);
  });
  it('10000 L is still accepted', () => {
    expect(conv(2, 10000).status).toBe('in-range');
  });
});

describe('initial charge after a refill', () => {
  // 60.6 L = 16.009 US gal (NIST SP 811). Target 1.2 units/gal -> 19.21 units.
  it('filter gives 10 units, liquid 8 units/L: (19.21 - 10)/8 = 1.151 L, rounded up to the next 0.05 L step = 1.20 L', () => {
    const r = initialChargeAfterRefill({ capacityL: 60.6, filterPrechargeUnits: 10, liquidUnitsPerLitre: 8 });
    expect(r.liquidL).toBeCloseTo(1.2, 10);
    expect(r.expectedUnitsPerGal).toBeGreaterThanOrEqual(1.2);
    expect(r.expectedUnitsPerGal).toBeCloseTo((10 + 1.2 * 8) / 16.00888, 3);
  });
  it('the filter alone reaches the target -> no liquid', () => {
    const r = initialChargeAfterRefill({ capacityL: 60.6, filterPrechargeUnits: 25, liquidUnitsPerLitre: 8 });
    expect(r.liquidL).toBe(0);
    expect(r.reasons[0]).toMatch(/no liquid/);
  });
  it('never a dose above the upper limit: coarse steps round down instead of up', () => {
    // 3.785 L system (1 gal), target 2.9, upper 3.0, liquid 100 units/L: 2.9 units -> 0.029 L; 0.05 L would give 5 units/gal.
    const r = initialChargeAfterRefill({ capacityL: 3.785411784, targetUnitsPerGal: 2.9, filterPrechargeUnits: 0, liquidUnitsPerLitre: 100 });
    expect(r.liquidL).toBe(0);
    expect(r.expectedUnitsPerGal).toBeLessThanOrEqual(3.0);
  });
  it('a filter that alone exceeds the upper limit gives a caution to fit a blank filter', () => {
    const r = initialChargeAfterRefill({ capacityL: 20, filterPrechargeUnits: 30, liquidUnitsPerLitre: 8 });
    expect(r.liquidL).toBe(0);
    expect(r.cautions.join(' ')).toMatch(/blank filter/);
  });
  it('doses are multiples of 0.05 L', () => {
    for (const cap of [17, 44.4, 93.2, 250]) {
      const r = initialChargeAfterRefill({ capacityL: cap, filterPrechargeUnits: 5, liquidUnitsPerLitre: 7 });
      expect(Math.abs(r.liquidL / 0.05 - Math.round(r.liquidL / 0.05))).toBeLessThan(1e-9);
      expect(r.expectedUnitsPerGal).toBeLessThanOrEqual(3.0);
    }
  });
  it.each([
    [{ capacityL: 0, filterPrechargeUnits: 5, liquidUnitsPerLitre: 8 }, /capacityL/],
    [{ capacityL: 60, filterPrechargeUnits: -1, liquidUnitsPerLitre: 8 }, /filterPrechargeUnits/],
    [{ capacityL: 60, filterPrechargeUnits: 5, liquidUnitsPerLitre: 0 }, /liquidUnitsPerLitre/],
    [{ capacityL: 60, filterPrechargeUnits: 5, liquidUnitsPerLitre: 8, targetUnitsPerGal: 3.5 }, /targetUnitsPerGal/],
    [{ capacityL: 60, filterPrechargeUnits: Number.NaN, liquidUnitsPerLitre: 8 }, /filterPrechargeUnits/],
  ])('bad input %# -> RangeError naming the field', (input, re) => {
    expect(() => initialChargeAfterRefill(input as never)).toThrow(RangeError);
    expect(() => initialChargeAfterRefill(input as never)).toThrow(re);
  });
});

describe('minimum practical dose: never "low" with 0.00 L (5 mL minimum and 5 mL steps below 0.05 L are common practice)', () => {
  it('0.5 L system: 0.5 / 3.785411784 / 4 pints x 0.473176473 = 0.015625 L exactly (NIST SP 811 factors) -> 15 mL, said so', () => {
    const d = conv(0.5, 0.5);
    expect(d.status).toBe('low');
    expect(d.liquidAdditiveL).toBeCloseTo(0.015, 10);
    expect(d.liquidAdditiveL).toBeGreaterThan(0);
    expect(d.doseNote).toMatch(/16 mL exactly, rounded to 15 mL/);
    expect(d.reasons.join(' ')).toMatch(/0\.015 L/);
    expect(d.liquidAdditiveUsPints).toBeCloseTo(0.015 / 0.473176473, 3);
  });
  it('the smallest system still gets the 5 mL minimum with the reason', () => {
    const d = conv(0.5, 0.05); // exact 1.6 mL
    expect(d.liquidAdditiveL).toBe(MIN_PRACTICAL_DOSE_L);
    expect(d.doseNote).toMatch(/below the smallest practical dose of 5 mL/);
  });
  it.each([
    [0, 0],
    [0.0012, 0.005],
    [0.0074, 0.005],
    [0.0076, 0.01],
    [0.0249, 0.025],
    [0.049, 0.05],
    [0.074, 0.05],
    [0.076, 0.1],
    [1.894, 1.9],
  ])('practicalDose(%f L) -> %f L (5 mL steps below 0.05 L, 0.05 L steps above, hand arithmetic)', (exact, litres) => {
    expect(practicalDose(exact).litres).toBeCloseTo(litres, 10);
  });
  it('the note says how it was rounded', () => {
    expect(practicalDose(0).note).toBeNull();
    expect(practicalDose(1.894).note).toMatch(/Rounded from 1\.894 L to the nearest 0\.05 L/);
  });
});
