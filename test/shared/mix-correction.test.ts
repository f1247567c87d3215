/**
 * Mix correction by mass balance on glycol. Check: the mixing (dilution) equation C1V1 + C2V2 = C3(V1 + V2) of
 * general chemistry (any textbook, e.g. the "solution dilution" section of a general chemistry text), applied
 * independently in the test to the volumes the code returns, plus hand-computed figures.
 */
import { correctMix } from '../../shared/coolant/mix-correction';

/** Independent check: concentration after mixing what stays in the system with what is added. */
const mixed = (V: number, c0: number, drain: number, cr: number): number => ((V - drain) * c0 + drain * cr) / V;

describe('raise with pure glycol: x = V (c1 - c0) / (1 - c0)', () => {
  it('60 L at 30 % to 50 %: drain 60 x 0.2 / 0.7 = 17.14 L (hand arithmetic)', () => {
    const r = correctMix({ capacityL: 60, measuredPercent: 30, targetPercent: 50 });
    expect(r.refill).toBe('glycol');
    expect(r.drainL).toBeCloseTo(17.142857, 5);
    expect(r.addL).toBe(r.drainL);
    // C1V1 + C2V2 = C3V3: 0.30 x 42.857 + 1.00 x 17.143 = 30.0 L glycol = 0.50 x 60 L
    expect(0.3 * (60 - r.drainL) + 1.0 * r.drainL).toBeCloseTo(0.5 * 60, 9);
    expect(r.resultingPercent).toBeCloseTo(50, 9);
  });
});

describe('lower with water: x = V (c0 - c1) / c0', () => {
  it('40 L at 60 % to 50 %: drain 40 x 0.1 / 0.6 = 6.67 L (hand arithmetic)', () => {
    const r = correctMix({ capacityL: 40, measuredPercent: 60, targetPercent: 50 });
    expect(r.refill).toBe('water');
    expect(r.drainL).toBeCloseTo(6.666667, 5);
    // C1V1 = C2V2 (water adds no glycol): 0.60 x 33.33 = 0.50 x 40
    expect(0.6 * (40 - r.drainL)).toBeCloseTo(0.5 * 40, 9);
  });
});

describe('with a premix of concentration cp: x = V (c1 - c0) / (cp - c0)', () => {
  it('100 L at 35 % to 45 % with 60 % premix: drain 100 x 0.10 / 0.25 = 40 L (hand arithmetic)', () => {
    const r = correctMix({ capacityL: 100, measuredPercent: 35, targetPercent: 45, premixPercent: 60 });
    expect(r.refill).toBe('premix');
    expect(r.drainL).toBeCloseTo(40, 9);
    expect(mixed(100, 0.35, r.drainL, 0.6)).toBeCloseTo(0.45, 12);
  });
  it('lowering with a weak premix: 80 L at 55 % to 50 % with 20 % premix: 80 x 0.05 / 0.35 = 11.43 L', () => {
    const r = correctMix({ capacityL: 80, measuredPercent: 55, targetPercent: 50, premixPercent: 20 });
    expect(r.drainL).toBeCloseTo(11.428571, 5);
    expect(mixed(80, 0.55, r.drainL, 0.2)).toBeCloseTo(0.5, 12);
  });
  it('a premix on the wrong side of the target cannot get there -> RangeError naming premixPercent', () => {
    expect(() => correctMix({ capacityL: 100, measuredPercent: 35, targetPercent: 45, premixPercent: 40 })).toThrow(/premixPercent/);
    expect(() => correctMix({ capacityL: 100, measuredPercent: 55, targetPercent: 50, premixPercent: 60 })).toThrow(RangeError);
  });
  it('a premix equal to the target: drain completely and refill with the premix (x = V)', () => {
    const r = correctMix({ capacityL: 100, measuredPercent: 55, targetPercent: 50, premixPercent: 50 });
    expect(r.fullDrain).toBe(true);
    expect(r.drainL).toBe(100);
    expect(r.addL).toBe(100);
    expect(r.refill).toBe('premix');
    expect(mixed(100, 0.55, r.drainL, 0.5)).toBeCloseTo(0.5, 12);
    expect(r.reasons[0]).toMatch(/drain the system completely/);
    expect(r.reasons.join(' ')).toMatch(/removes 100 % of its additive/);
  });
});

describe('edge cases', () => {
  it('already at target: nothing to drain', () => {
    const r = correctMix({ capacityL: 50, measuredPercent: 50, targetPercent: 50 });
    expect(r.drainL).toBe(0);
    expect(r.refill).toBeNull();
  });
  it('from plain water to 50 % needs half the system drained and filled with glycol', () => {
    expect(correctMix({ capacityL: 50, measuredPercent: 0, targetPercent: 50 }).drainL).toBeCloseTo(25, 10);
  });
  it('the drain never exceeds the capacity', () => {
    for (const [c0, c1] of [
      [10, 60],
      [90, 1],
      [0, 60],
      [100, 0],
    ]) {
      const r = correctMix({ capacityL: 70, measuredPercent: c0, targetPercent: c1 });
      expect(r.drainL).toBeLessThanOrEqual(70 + 1e-9);
      expect(r.resultingPercent).toBeCloseTo(c1, 9);
    }
  });
  it.each([
    [{ capacityL: 0, measuredPercent: 30, targetPercent: 50 }, /capacityL/],
    [{ capacityL: 20000, measuredPercent: 30, targetPercent: 50 }, /capacityL/],
    [{ capacityL: 60, measuredPercent: -1, targetPercent: 50 }, /measuredPercent/],
    [{ capacityL: 60, measuredPercent: 30, targetPercent: 101 }, /targetPercent/],
    [{ capacityL: 60, measuredPercent: 30, targetPercent: 60.1 }, /targetPercent/],
    [{ capacityL: 60, measuredPercent: 30, targetPercent: 50, scaUnitsPerGal: -1 }, /scaUnitsPerGal/],
    [{ capacityL: 60, measuredPercent: 30, targetPercent: 50, liquidUnitsPerLitre: 0 }, /liquidUnitsPerLitre/],
    [{ capacityL: 60, measuredPercent: 30, targetPercent: Number.NaN }, /targetPercent/],
    [{ capacityL: 60, measuredPercent: 30, targetPercent: 50, premixPercent: 120 }, /premixPercent/],
  ])('bad input %# -> RangeError naming the field', (input, re) => {
    expect(() => correctMix(input)).toThrow(RangeError);
    expect(() => correctMix(input)).toThrow(re);
  });
});

describe('targets above 60 % are refused (more glycol protects less)', () => {
  it('30 -> 100 % is refused naming targetPercent; 60 % exactly is accepted', () => {
    expect(() => correctMix({ capacityL: 400, measuredPercent: 30, targetPercent: 100 })).toThrow(/targetPercent.*protects less/);
    expect(correctMix({ capacityL: 400, measuredPercent: 30, targetPercent: 60 }).refill).toBe('glycol');
  });
});

describe('additive dilution by mass balance (units = level x US gal; 1 US gal = 3.785411784 L, NIST SP 811)', () => {
  it('60 L at 30 % to 50 %: 17.14 L of 60 L replaced = 28.6 % of the additive gone, said without a reading', () => {
    const r = correctMix({ capacityL: 60, measuredPercent: 30, targetPercent: 50 });
    expect(r.additive!.fractionReplaced).toBeCloseTo(0.2 / 0.7, 12);
    expect(r.additive!.levelAfterUnitsPerGal).toBeNull();
    expect(r.reasons.join(' ')).toMatch(/removes 29 % of its additive/);
    expect(r.reasons.join(' ')).toMatch(/Test the additive/);
  });
  it('with a reading 2.0 units/gal and 8 units/L: after = 2.0 x (1 - 2/7) = 1.4286; restore 0.5714 x 15.8503 gal = 9.057 units = 1.132 L -> 1.15 L (hand arithmetic)', () => {
    const r = correctMix({ capacityL: 60, measuredPercent: 30, targetPercent: 50, scaUnitsPerGal: 2.0, liquidUnitsPerLitre: 8 });
    const a = r.additive!;
    expect(a.levelAfterUnitsPerGal).toBeCloseTo(1.428571, 5);
    expect(a.restoreUnits).toBeCloseTo((2 - 1.4285714) * (60 / 3.785411784), 4);
    expect(a.restoreUnits).toBeCloseTo(9.0573, 3);
    expect(a.restoreLiquidL).toBeCloseTo(1.15, 10);
    expect(r.reasons.join(' ')).toMatch(/Add 1\.15 L of liquid additive/);
  });
  it('with a reading but no strength: the units, and a request for the strength', () => {
    const r = correctMix({ capacityL: 60, measuredPercent: 30, targetPercent: 50, scaUnitsPerGal: 2.0 });
    expect(r.additive!.restoreLiquidL).toBeNull();
    expect(r.reasons.join(' ')).toMatch(/strength/);
  });
  it('nothing to do: no dilution', () => {
    expect(correctMix({ capacityL: 60, measuredPercent: 50, targetPercent: 50, scaUnitsPerGal: 2 }).additive).toBeNull();
  });
});
