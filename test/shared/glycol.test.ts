/**
 * Freeze points of glycol coolant. Table values: shared/reference/coolant-references.md, which cites
 * Lange's Handbook of Chemistry 15th ed. table 5.13 (propylene glycol, vol %) and ASHRAE Handbook -
 * Fundamentals 2009 ch. 31 table 4 (ethylene glycol, mass %). Densities: CRC Handbook, 20 °C.
 * Beyond those tables (to 60 % on both bases): CoolProp 8.0.0 (Python wheel, computed outside the project with
 * PropsSI('T_freeze', ...) on INCOMP::AEG / INCOMP::APG, its fits of ASHRAE glycol data by volume, and
 * INCOMP::MPG / INCOMP::MEG, its fits of Melinder's data by mass).
 */
import {
  assessFreezeProtection,
  convertPercent,
  freezePointC,
  freezeTable,
  massToVolumePercent,
  percentForFreezePoint,
  tableMaxPercent,
  volumeToMassPercent,
  waterMoleFraction,
} from '../../shared/coolant/glycol';
import { monotoneCurve } from '../../shared/coolant/monotone-interpolation';

describe('table points are returned exactly', () => {
  it.each([
    [10, -3.3],
    [20, -7.8],
    [30, -14.0],
    [40, -22.5],
    [50, -33.8],
    [60, -48.5],
  ])('ethylene glycol %d mass %% -> %f °C (ASHRAE Fundamentals 2009, ch. 31, table 4)', (p, fp) => {
    expect(freezePointC('ethylene', p, 'mass')).toBeCloseTo(fp, 10);
  });
  it.each([
    [10, -2.2],
    [20, -6.7],
    [30, -12.8],
    [40, -20.6],
    [50, -33.3],
  ])("propylene glycol %d vol %% -> %f °C (Lange's 15th ed., table 5.13)", (p, fp) => {
    expect(freezePointC('propylene', p, 'volume')).toBeCloseTo(fp, 10);
  });
  it('0 % glycol freezes at 0 °C (ice point of water at 1 atm)', () => {
    expect(freezePointC('ethylene', 0, 'mass')).toBe(0);
    expect(freezePointC('propylene', 0, 'volume')).toBe(0);
  });
});

describe('between table points', () => {
  // Reference values from SciPy 1.17.1 scipy.interpolate.PchipInterpolator on the same tables, including the
  // CoolProp points beyond 60 mass % EG and 50 vol % PG (computed outside the project).
  it.each([
    [5, -1.511538],
    [15, -5.374092],
    [25, -10.655611],
    [35, -17.933506],
    [45, -27.765541],
    [55, -40.999819],
    [61, -49.875789],
  ])('ethylene %d mass %% matches SciPy PchipInterpolator (%f °C)', (p, fp) => {
    expect(freezePointC('ethylene', p, 'mass')).toBeCloseTo(fp, 5);
  });
  it.each([
    [5, -0.861847],
    [15, -4.171997],
    [25, -9.54165],
    [35, -16.347707],
    [45, -26.33224],
    [52.5, -37.25546],
    [57.5, -46.194944],
  ])('propylene %d vol %% matches SciPy PchipInterpolator (%f °C)', (p, fp) => {
    expect(freezePointC('propylene', p, 'volume')).toBeCloseTo(fp, 5);
  });
  // ASHRAE's table also lists the 5 % steps; these are recalled from memory (not in the reference file): within 0.5 °C.
  it.each([
    [15, -5.4],
    [25, -10.7],
    [35, -17.9],
    [45, -27.5],
    [55, -41.1],
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
  it.each([
    [30, 27.7],
    [50, 47.6],
    [60, 57.8],
  ])('EG %d mass %% is within 0.6 points of ASHRAE vol %% column %f (from memory)', (m, v) => {
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
  it('EG 57.36 vol % is the ASHRAE 60 mass % row (-48.5 °C); CoolProp 8.0 AEG gives -47.95 °C there (within 0.6 K)', () => {
    expect(massToVolumePercent('ethylene', 60)).toBeCloseTo(57.357, 2);
    expect(freezePointC('ethylene', 57.357, 'volume')).toBeCloseTo(-48.5, 2);
    expect(Math.abs(-47.954 - freezePointC('ethylene', 57.357, 'volume'))).toBeLessThan(0.6);
  });
  it("PG by mass: 50.93 mass % is Lange's 50 vol % row (-33.3 °C)", () => {
    expect(freezePointC('propylene', volumeToMassPercent('propylene', 50), 'mass')).toBeCloseTo(-33.3, 6);
    expect(freezePointC('propylene', 30, 'mass')).toBeLessThan(-12.0); // 30 mass % is ~29.4 vol %: a bit warmer than -12.8
    expect(freezePointC('propylene', 30, 'mass')).toBeGreaterThan(-12.8);
  });
});

describe('0-60 % on both bases for both glycols', () => {
  it('the tables cover at least 60 % by volume and by mass', () => {
    for (const g of ['ethylene', 'propylene'] as const) {
      for (const b of ['volume', 'mass'] as const) expect(tableMaxPercent(g, b)).toBeGreaterThanOrEqual(60 - 1e-9);
    }
  });
  it('every table point names its source', () => {
    for (const g of ['ethylene', 'propylene'] as const) {
      const t = freezeTable(g);
      expect(t.pointSources).toHaveLength(t.percent.length);
    }
  });
  // CoolProp 8.0.0 PropsSI('T_freeze', 'P', 101325, 'T', 300, 'INCOMP::AEG[x]') - 273.15, computed outside the project.
  it.each([
    [50, -37.115],
    [52, -39.947],
    [55, -44.369],
    [58, -48.937],
    [59, -50.477],
    [60, -52.02],
  ])('EG %d vol %% within 1.5 K of CoolProp 8.0 AEG (ASHRAE fit) %f °C', (v, fp) => {
    expect(Math.abs(freezePointC('ethylene', v, 'volume') - fp)).toBeLessThan(1.5);
  });
  it('EG 60 vol % is the CoolProp AEG point -52.0 °C (also the common dilution-chart figure -62 °F = -52.2 °C, from memory, M)', () => {
    expect(freezePointC('ethylene', 60, 'volume')).toBeCloseTo(-52.0, 6);
    expect(Math.abs(freezePointC('ethylene', 60, 'volume') - ((-62 - 32) * 5) / 9)).toBeLessThan(0.5);
  });
  // CoolProp 8.0.0 INCOMP::APG (ASHRAE fit, vol %), computed outside the project.
  it.each([
    [50, -33.661],
    [52, -36.665],
    [52.5, -37.45],
    [55, -41.593],
    [57.5, -46.119],
    [58, -47.072],
    [60, -51.057],
  ])('PG %d vol %% within 0.6 K of CoolProp 8.0 APG (ASHRAE fit) %f °C', (v, fp) => {
    expect(Math.abs(freezePointC('propylene', v, 'volume') - fp)).toBeLessThan(0.6);
  });
  // CoolProp 8.0.0 INCOMP::MPG (Melinder, mass %): an independent fit.
  it.each([
    [30, -12.789],
    [40, -20.568],
    [50, -33.551],
    [55, -40.158],
    [60, -50.003],
  ])('PG %d mass %% within 2 K of CoolProp 8.0 MPG (Melinder; Lange and Melinder differ by up to 1.6 K near 50 %%) %f °C', (m, fp) => {
    expect(Math.abs(freezePointC('propylene', m, 'mass') - fp)).toBeLessThan(2.0);
  });
  it('PG 60 % is about -48 °C in the ASHRAE Fundamentals ch. 31 propylene glycol table as recalled from memory (M): within 3.5 K', () => {
    expect(Math.abs(freezePointC('propylene', 60, 'mass') - -48)).toBeLessThan(3.5);
  });
  it('monotone over the whole 0-60 % range on both bases', () => {
    for (const g of ['ethylene', 'propylene'] as const) {
      for (const b of ['volume', 'mass'] as const) {
        let prev = Infinity;
        for (let p = 0; p <= 60; p += 0.5) {
          const fp = freezePointC(g, p, b);
          expect(fp).toBeLessThan(prev + 1e-12);
          prev = fp;
        }
      }
    }
  });
  it('inverse round trips across 0-60 % on both bases', () => {
    for (const g of ['ethylene', 'propylene'] as const) {
      for (const b of ['volume', 'mass'] as const) {
        for (const p of [5, 25, 45, 52, 57, 60]) {
          expect(percentForFreezePoint(g, freezePointC(g, p, b), b)).toBeCloseTo(p, 5);
        }
      }
    }
  });
  it('the inverse reaches the colder end: -50 °C needs 59.1 vol % PG / 58.7 vol % EG, both below 60', () => {
    expect(percentForFreezePoint('propylene', -50, 'volume')).toBeLessThan(60);
    expect(percentForFreezePoint('propylene', -50, 'volume')).toBeGreaterThan(57.5);
    expect(percentForFreezePoint('ethylene', -50, 'volume')).toBeLessThan(60);
    expect(percentForFreezePoint('ethylene', -50, 'volume')).toBeGreaterThan(57.36);
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
    expect(() => percentForFreezePoint('propylene', -52, 'volume')).toThrow(RangeError);
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
  it('exactly 60 mass % EG is in the table and not flagged; 60.5 is flagged (a value, with the warning); 63 is beyond the table', () => {
    const at = assessFreezeProtection('ethylene', 60, 'mass');
    expect(at.freezePointC).toBeCloseTo(-48.5, 6);
    expect(at.overConcentrated).toBe(false);
    const over = assessFreezeProtection('ethylene', 60.5, 'mass');
    expect(over.overConcentrated).toBe(true);
    expect(over.freezePointC).toBeLessThan(-48.5);
    expect(over.warnings.join(' ')).toMatch(/protects less/);
    const beyond = assessFreezeProtection('ethylene', 63, 'mass');
    expect(beyond.freezePointC).toBeNull();
    expect(beyond.warnings.join(' ')).toMatch(/beyond the published table/);
  });
  it('a usual 50 vol % mix: a freeze point, no warning, source named', () => {
    const a = assessFreezeProtection('propylene', 40, 'volume');
    expect(a.freezePointC).toBeCloseTo(-20.6, 6);
    expect(a.warnings).toEqual([]);
    expect(a.source).toMatch(/Lange/);
  });
  it('PG 55 vol % has a value (CoolProp APG point) and no warning; 61 vol % is beyond the table and flagged', () => {
    const a = assessFreezeProtection('propylene', 55, 'volume');
    expect(a.freezePointC).toBeCloseTo(-41.6, 6);
    expect(a.overConcentrated).toBe(false);
    expect(a.warnings).toEqual([]);
    const b = assessFreezeProtection('propylene', 61, 'volume');
    expect(b.freezePointC).toBeNull();
    expect(b.overConcentrated).toBe(true);
    expect(b.warnings[0]).toMatch(/beyond the published table/);
  });
});

describe('bad input -> RangeError naming the field', () => {
  it.each([
    [() => freezePointC('ethylene', -1, 'mass'), /percent/],
    [() => freezePointC('ethylene', 63, 'mass'), /percent/],
    [() => freezePointC('propylene', 60.5, 'volume'), /percent/],
    [() => freezePointC('ethylene', 60.5, 'volume'), /percent/],
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
