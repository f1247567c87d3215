/**
 * Freeze points of glycol coolant. Table values: shared/reference/coolant-references.md, which cites
 * Lange's Handbook of Chemistry 15th ed. table 5.13 (propylene glycol, vol %) and ASHRAE Handbook -
 * Fundamentals 2009 ch. 31 table 4 (ethylene glycol, mass %). Densities: CRC Handbook, 20 °C.
 */
import {
  assessFreezeProtection, convertPercent, freezePointC, freezeTable, massToVolumePercent, percentForFreezePoint,
  tableMaxPercent, volumeToMassPercent, waterMoleFraction,
} from '../../shared/coolant/glycol';
import { monotoneCurve } from '../../shared/coolant/monotone-interpolation';

describe('table points are returned exactly', () => {
  it.each([
    [10, -3.3], [20, -7.8], [30, -14.0], [40, -22.5], [50, -33.8], [60, -48.5],
  ])('ethylene glycol %d mass %% -> %f °C (ASHRAE Fundamentals 2009, ch. 31, table 4)', (p, fp) => {
    expect(freezePointC('ethylene', p, 'mass')).toBeCloseTo(fp, 10);
  });
  it.each([
    [10, -2.2], [20, -6.7], [30, -12.8], [40, -20.6], [50, -33.3],
  ])("propylene glycol %d vol %% -> %f °C (Lange's 15th ed., table 5.13)", (p, fp) => {
    expect(freezePointC('propylene', p, 'volume')).toBeCloseTo(fp, 10);
  });
  it('0 % glycol freezes at 0 °C (ice point of water at 1 atm)', () => {
    expect(freezePointC('ethylene', 0, 'mass')).toBe(0);
    expect(freezePointC('propylene', 0, 'volume')).toBe(0);
  });
});

describe('between table points', () => {
  // Reference values from SciPy 1.17 scipy.interpolate.PchipInterpolator on the same tables (computed outside the project).
  it.each([
    [5, -1.511538], [15, -5.374092], [25, -10.655611], [35, -17.933506], [45, -27.765541], [55, -40.697212],
  ])('ethylene %d mass %% matches SciPy PchipInterpolator (%f °C)', (p, fp) => {
    expect(freezePointC('ethylene', p, 'mass')).toBeCloseTo(fp, 5);
  });
  it.each([
    [5, -0.861847], [15, -4.171997], [25, -9.54165], [35, -16.347707], [45, -26.264299],
  ])('propylene %d vol %% matches SciPy PchipInterpolator (%f °C)', (p, fp) => {
    expect(freezePointC('propylene', p, 'volume')).toBeCloseTo(fp, 5);
  });
  // ASHRAE's table also lists the 5 % steps; these are recalled from memory (not in the reference file): within 0.5 °C.
  it.each([
    [15, -5.4], [25, -10.7], [35, -17.9], [45, -27.5], [55, -41.1],
  ])('ethylene %d mass %% within 0.5 °C of ASHRAE table 4 intermediate row %f °C (from memory)', (p, fp) => {
    expect(Math.abs(freezePointC('ethylene', p, 'mass') - fp)).toBeLessThan(0.5);
  });
  it('monotone: never overshoots its neighbouring table values, always falls with concentration', () => {
    for (const glycol of ['ethylene', 'propylene'] as const) {
      const t = freezeTable(glycol);
      let prev = Infinity;
      for (let p = 0; p <= t.percent[t.percent.length - 1]; p += 0.25) {
        const fp = freezePointC(glycol, p, t.basis);
        expect(fp).toBeLessThanOrEqual(prev);
        prev = fp;
      }
    }
  });
  it('interpolation rejects points outside its table', () => {
    expect(() => monotoneCurve([0, 1], [0, 1]).at(1.5)).toThrow(RangeError);
  });
});

describe('volume <-> mass conversion (CRC densities at 20 °C, no mixing contraction)', () => {
  it('50 vol % EG = 52.72 mass %: 0.5x1.1132 / (0.5x1.1132 + 0.5x0.9982), hand arithmetic', () => {
    expect(volumeToMassPercent('ethylene', 50)).toBeCloseTo(52.7233, 3);
  });
  it('50 vol % PG = 50.93 mass %: 0.5x1.0361 / (0.5x1.0361 + 0.5x0.9982), hand arithmetic', () => {
    expect(volumeToMassPercent('propylene', 50)).toBeCloseTo(50.9315, 3);
  });
  // ASHRAE table 4 lists the volume % beside each mass % (recalled from memory: 30 -> 27.7, 50 -> 47.6, 60 -> 57.8).
  it.each([[30, 27.7], [50, 47.6], [60, 57.8]])('EG %d mass %% is within 0.6 points of ASHRAE vol %% column %f (from memory)', (m, v) => {
    expect(Math.abs(massToVolumePercent('ethylene', m) - v)).toBeLessThan(0.6);
  });
  it('round trips', () => {
    for (const g of ['ethylene', 'propylene'] as const) {
      expect(massToVolumePercent(g, volumeToMassPercent(g, 37))).toBeCloseTo(37, 10);
      expect(convertPercent(g, 40, 'mass', 'mass')).toBe(40);
    }
    expect(volumeToMassPercent('ethylene', 0)).toBe(0);
    expect(volumeToMassPercent('ethylene', 100)).toBe(100);
  });
  it('water mole fraction of 50 mass % EG: (50/18.015)/(50/18.015 + 50/62.068) = 0.7750 (IUPAC molar masses, hand arithmetic)', () => {
    expect(waterMoleFraction('ethylene', 50, 'mass')).toBeCloseTo(0.77504, 4);
    expect(waterMoleFraction('propylene', 0, 'volume')).toBe(1);
  });
});

describe('the other two bases', () => {
  it('ASTM D3306: a 50 vol % ethylene glycol dilution freezes at or below -37 °C', () => {
    const fp = freezePointC('ethylene', 50, 'volume');
    expect(fp).toBeLessThanOrEqual(-37);
    expect(fp).toBeGreaterThan(-40); // and is not wildly colder: it lies between the 50 and 55 mass % rows of ASHRAE
  });
  it('EG by volume covers up to 57.4 vol % (60 mass %, ASHRAE table end)', () => {
    expect(tableMaxPercent('ethylene', 'volume')).toBeCloseTo(57.357, 2);
    expect(freezePointC('ethylene', tableMaxPercent('ethylene', 'volume'), 'volume')).toBeCloseTo(-48.5, 6);
  });
  it("PG by mass: 50.93 mass % is Lange's 50 vol % row (-33.3 °C)", () => {
    expect(freezePointC('propylene', volumeToMassPercent('propylene', 50), 'mass')).toBeCloseTo(-33.3, 6);
    expect(freezePointC('propylene', 30, 'mass')).toBeLessThan(-12.0); // 30 mass % is ~29.4 vol %: a bit warmer than -12.8
    expect(freezePointC('propylene', 30, 'mass')).toBeGreaterThan(-12.8);
  });
});

describe('inverse: glycol share for a design low temperature', () => {
  it("-33.3 °C needs 50 vol % PG (Lange's table point)", () => {
    expect(percentForFreezePoint('propylene', -33.3, 'volume')).toBeCloseTo(50, 6);
  });
  it('-33.8 °C needs 50 mass % EG (ASHRAE table point), i.e. 47.28 vol % by the CRC densities', () => {
    expect(percentForFreezePoint('ethylene', -33.8, 'mass')).toBeCloseTo(50, 6);
    expect(percentForFreezePoint('ethylene', -33.8, 'volume')).toBeCloseTo(47.2767, 3);
  });
  it('-37 °C (ASTM D3306 50 vol % requirement) needs no more than 50 vol % EG', () => {
    expect(percentForFreezePoint('ethylene', -37, 'volume')).toBeLessThanOrEqual(50);
  });
  it('round trip between table points', () => {
    for (const c of [-5, -18, -25, -40]) {
      expect(freezePointC('ethylene', percentForFreezePoint('ethylene', c, 'mass'), 'mass')).toBeCloseTo(c, 6);
      expect(freezePointC('ethylene', percentForFreezePoint('ethylene', c, 'volume'), 'volume')).toBeCloseTo(c, 6);
    }
    expect(freezePointC('propylene', percentForFreezePoint('propylene', -25, 'mass'), 'mass')).toBeCloseTo(-25, 6);
  });
  it('at or above 0 °C no glycol is needed for freeze protection', () => {
    expect(percentForFreezePoint('ethylene', 0, 'volume')).toBe(0);
    expect(percentForFreezePoint('propylene', 5, 'mass')).toBe(0);
  });
  it('colder than the table reaches -> RangeError naming designLowC', () => {
    expect(() => percentForFreezePoint('propylene', -40, 'volume')).toThrow(RangeError);
    expect(() => percentForFreezePoint('ethylene', -60, 'mass')).toThrow(/designLowC/);
    expect(() => percentForFreezePoint('ethylene', Number.NaN, 'mass')).toThrow(/designLowC/);
  });
});

describe('strong mixes (more glycol protects less; pure EG melts at -12.9 °C, CRC)', () => {
  it('warns above about 60 %, and beyond the table gives no freeze point', () => {
    const a = assessFreezeProtection('ethylene', 70, 'volume');
    expect(a.overConcentrated).toBe(true);
    expect(a.freezePointC).toBeNull();
    expect(a.warnings.join(' ')).toMatch(/protects less/);
    expect(a.warnings.join(' ')).toMatch(/-12\.9/);
  });
  it('exactly 60 mass % EG is in the table and not flagged; 60.5 is flagged and beyond the table', () => {
    const at = assessFreezeProtection('ethylene', 60, 'mass');
    expect(at.freezePointC).toBeCloseTo(-48.5, 6);
    expect(at.overConcentrated).toBe(false);
    const over = assessFreezeProtection('ethylene', 60.5, 'mass');
    expect(over.overConcentrated).toBe(true);
    expect(over.freezePointC).toBeNull();
  });
  it('a usual 50 vol % mix: a freeze point, no warning, source named', () => {
    const a = assessFreezeProtection('propylene', 40, 'volume');
    expect(a.freezePointC).toBeCloseTo(-20.6, 6);
    expect(a.warnings).toEqual([]);
    expect(a.source).toMatch(/Lange/);
  });
  it('PG 55 vol % is beyond the published table but below the strong-mix flag', () => {
    const a = assessFreezeProtection('propylene', 55, 'volume');
    expect(a.freezePointC).toBeNull();
    expect(a.overConcentrated).toBe(false);
    expect(a.warnings[0]).toMatch(/beyond the published table/);
  });
});

describe('bad input -> RangeError naming the field', () => {
  it.each([
    [() => freezePointC('ethylene', -1, 'mass'), /percent/],
    [() => freezePointC('ethylene', 61, 'mass'), /percent/],
    [() => freezePointC('propylene', 51, 'volume'), /percent/],
    [() => freezePointC('ethylene', Number.NaN, 'volume'), /percent/],
    [() => freezePointC('diesel' as never, 30, 'volume'), /glycol/],
    [() => freezePointC('ethylene', 30, 'weight' as never), /basis/],
    [() => assessFreezeProtection('ethylene', 101, 'volume'), /percent/],
    [() => volumeToMassPercent('ethylene', Number.POSITIVE_INFINITY), /percent/],
  ])('case %#', (fn, re) => {
    expect(fn).toThrow(RangeError);
    expect(fn).toThrow(re);
  });
});
