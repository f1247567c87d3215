/**
 * Additive and glycol after top-ups: mass balance of mixing (C1V1 + C2V2 = C3V3, any general chemistry text),
 * figures by hand arithmetic. Additive low limit 1.2 units/US gal: common practice.
 */
import { estimateAfterTopUps } from '../../shared/coolant/top-up';

const base = { capacityL: 40, scaUnitsPerGal: 2.0, glycolPercent: 40, lowUnitsPerGal: 1.2 };

describe('estimate after top-ups', () => {
  it('4 L of water into 40 L: additive 2.0 x 0.9 = 1.80, glycol 40 x 0.9 = 36.0 %', () => {
    const e = estimateAfterTopUps({ ...base, topUps: [{ volumeL: 4, liquid: 'water' }] });
    expect(e.scaUnitsPerGal).toBeCloseTo(1.8, 12);
    expect(e.glycolPercent).toBeCloseTo(36, 12);
    expect(e.replacedFraction).toBeCloseTo(0.1, 12);
    expect(e.belowLow).toBe(false);
  });
  it('then 4 L of 50 % premix: additive 1.8 x 0.9 = 1.62; glycol 36 x 0.9 + 50 x 0.1 = 37.4 %', () => {
    const e = estimateAfterTopUps({
      ...base,
      topUps: [
        { volumeL: 4, liquid: 'water' },
        { volumeL: 4, liquid: 'premix', premixPercent: 50 },
      ],
    });
    expect(e.scaUnitsPerGal).toBeCloseTo(1.62, 12);
    expect(e.glycolPercent).toBeCloseTo(37.4, 12);
    expect(e.replacedFraction).toBeCloseTo(0.19, 12);
    expect(e.addedL).toBe(8);
  });
  it('pure glycol raises the glycol share: 40 x 0.95 + 100 x 0.05 = 43.0 %', () => {
    expect(estimateAfterTopUps({ ...base, topUps: [{ volumeL: 2, liquid: 'glycol' }] }).glycolPercent).toBeCloseTo(43, 12);
  });
  it('falling below the low limit suggests a test: 2.0 x 0.6 = 1.20 is not below; 2.0 x 0.59 = 1.18 is', () => {
    expect(estimateAfterTopUps({ ...base, topUps: [{ volumeL: 16, liquid: 'water' }] }).belowLow).toBe(false);
    const e = estimateAfterTopUps({ ...base, topUps: [{ volumeL: 16.4, liquid: 'water' }] });
    expect(e.scaUnitsPerGal).toBeCloseTo(1.18, 12);
    expect(e.belowLow).toBe(true);
    expect(e.reasons.join(' ')).toMatch(/test the coolant now/);
  });
  it('no additive reading: says the inhibitors are diluted by the same share', () => {
    const e = estimateAfterTopUps({ ...base, scaUnitsPerGal: null, topUps: [{ volumeL: 4, liquid: 'water' }] });
    expect(e.scaUnitsPerGal).toBeNull();
    expect(e.reasons.join(' ')).toMatch(/same share/);
  });
  it('nitrite is diluted by the same share: 1000 ppm, 8 L water into 40 L -> 1000 x 0.8 = 800 ppm (not below 800); 9 L -> 775 ppm, test now', () => {
    const n = { ...base, scaUnitsPerGal: null, nitritePpm: 1000, nitriteLowPpm: 800 };
    const at = estimateAfterTopUps({ ...n, topUps: [{ volumeL: 8, liquid: 'water' }] });
    expect(at.nitritePpm).toBeCloseTo(800, 9);
    expect(at.belowLow).toBe(false);
    const below = estimateAfterTopUps({ ...n, topUps: [{ volumeL: 9, liquid: 'premix', premixPercent: 50 }] });
    expect(below.nitritePpm).toBeCloseTo(775, 9);
    expect(below.belowLow).toBe(true);
    expect(below.reasons.join(' ')).toMatch(/below 800 ppm: test the coolant now/);
    expect(below.reasons.join(' ')).not.toMatch(/same share/);
    expect(() => estimateAfterTopUps({ ...n, nitriteLowPpm: undefined, topUps: [] })).toThrow(/nitriteLowPpm/);
  });
  it.each([
    [{ ...base, topUps: [{ volumeL: 41, liquid: 'water' as const }] }, /volumeL/],
    [{ ...base, topUps: [{ volumeL: -1, liquid: 'water' as const }] }, /volumeL/],
    [{ ...base, topUps: [{ volumeL: 1, liquid: 'juice' as never }] }, /liquid/],
    [{ ...base, topUps: [{ volumeL: 1, liquid: 'premix' as const }] }, /premixPercent/],
    [{ ...base, capacityL: 0, topUps: [] }, /capacityL/],
  ])('bad input %# -> RangeError naming the field', (input, re) => {
    expect(() => estimateAfterTopUps(input)).toThrow(re);
  });
});
