/**
 * Judging inhibitor chemistry and freeze protection. Limits and where they come from:
 * - pH 7.5 to 11.0: ASTM D3306 / D6210, pH of the 50 vol % dilution (recalled from memory, M);
 * - nitrite 800-3200 ppm, molybdate 300-1500 ppm, reserve alkalinity >= 5.0 mL: common practice of the trade for
 *   conventional heavy-duty coolant (from memory, M);
 * - freeze margin 5 K: common practice;
 * - freeze points: Lange's 15th ed. table 5.13 (PG vol %), ASHRAE Fundamentals 2009 ch. 31 table 4 (EG mass %),
 *   CRC densities (as in test/shared/glycol.test.ts).
 * Each boundary is checked on both sides: the limit itself is in range.
 */
import { DEFAULT_CHEMISTRY_LIMITS, judgeChemistry, resolveChemistryLimits, type ChemistryContext } from '../../shared/coolant/chemistry';
import { freezePointC } from '../../shared/coolant/glycol';

const ctx: ChemistryContext = { glycolType: 'propylene', designLowC: -20 };
const one = (reading: Parameters<typeof judgeChemistry>[0], c: ChemistryContext = ctx) => {
  const f = judgeChemistry(reading, c);
  expect(f).toHaveLength(1);
  return f[0];
};

describe('nitrite 800 to 3200 ppm (common practice, from memory)', () => {
  it.each([
    [799, 'low'],
    [800, 'ok'],
    [3200, 'ok'],
    [3201, 'high'],
  ])('%d ppm -> %s', (v, status) => {
    expect(one({ nitritePpm: v }).status).toBe(status);
  });
  it('low says why (cavitation pitting of wet liners) and what to do', () => {
    const f = one({ nitritePpm: 400 });
    expect(f.message).toMatch(/pit/);
    expect(f.action).toMatch(/additive/);
    expect(f.source).toMatch(/common practice/);
  });
  it('high says deposits and gel', () => {
    expect(one({ nitritePpm: 5000 }).message).toMatch(/deposits and gel/);
  });
});

describe('molybdate 300 to 1500 ppm (common practice, from memory)', () => {
  it.each([
    [299, 'low'],
    [300, 'ok'],
    [1500, 'ok'],
    [1501, 'high'],
  ])('%d ppm -> %s', (v, status) => {
    expect(one({ molybdatePpm: v }).status).toBe(status);
  });
});

describe('pH 7.5 to 11.0 (ASTM D3306 / D6210, from memory)', () => {
  it.each([
    [7.49, 'low'],
    [7.5, 'ok'],
    [11.0, 'ok'],
    [11.01, 'high'],
  ])('pH %f -> %s', (v, status) => {
    expect(one({ ph: v }).status).toBe(status);
  });
  it('low pH names glycol breakdown and a drain and refill', () => {
    const f = one({ ph: 6.8 });
    expect(f.message).toMatch(/glycol breakdown/);
    expect(f.action).toMatch(/Drain, flush and refill/);
  });
});

describe('reserve alkalinity at least 5.0 mL (common practice, from memory)', () => {
  it.each([
    [4.99, 'low'],
    [5.0, 'ok'],
    [12, 'ok'],
  ])('%f mL -> %s', (v, status) => {
    expect(one({ reserveAlkalinityMl: v }).status).toBe(status);
  });
});

describe('freeze protection against the site design low with a 5 K margin', () => {
  it('measured -24.9 °C against -20 °C design: need -25.0 °C -> short, with the glycol share to reach it', () => {
    const f = one({ freezePointC: -24.9 });
    expect(f.status).toBe('short');
    expect(f.message).toMatch(/-25\.0 °C/);
    // both unit systems in the words: -25 °C = -13.0 °F, -24.9 °C = -12.8 °F, 5 K = 9 °F (NIST SP 811: °F = °C x 1.8 + 32)
    expect(f.message).toContain('-24.9 °C (-12.8 °F)');
    expect(f.message).toContain('design low -20.0 °C (-4.0 °F) less the 5 K (9 °F) margin = -25.0 °C (-13.0 °F)');
    // -25 °C needs 44.0 vol % PG by Lange's table (between 40 -> -20.6 and 50 -> -33.3)
    expect(f.action).toMatch(/Raise the glycol to at least 4\d\.\d % by volume/);
  });
  it('measured -25.0 °C meets it exactly (boundary in range)', () => {
    expect(one({ freezePointC: -25 }).status).toBe('ok');
  });
  it('from the glycol share when no freeze point is measured: PG 40 vol % = -20.6 °C (Lange) is short of -25', () => {
    const f = one({ glycolPercent: 40 });
    expect(f.status).toBe('short');
    expect(f.value).toBeCloseTo(-20.6, 6);
    expect(f.message).toMatch(/Lange|published table/);
  });
  it("EG 50 mass % = -33.8 °C (ASHRAE) meets a -28 °C design low; EG by volume from the engine's glycol type", () => {
    const fp = freezePointC('ethylene', 47.28, 'volume');
    const f = one({ glycolPercent: 47.28 }, { glycolType: 'ethylene', designLowC: -28 });
    expect(f.value).toBeCloseTo(fp, 9);
    expect(f.status).toBe('ok');
  });
  it('the measured freeze point wins over the glycol share', () => {
    expect(one({ glycolPercent: 50, freezePointC: -10 }).value).toBe(-10);
  });
  it('no design low set: status unknown, with the action to set it', () => {
    const f = one({ freezePointC: -30 }, { glycolType: 'propylene', designLowC: null });
    expect(f.status).toBe('unknown');
    expect(f.action).toMatch(/administrator/);
  });
  it('a design low colder than 60 % glycol reaches: says the glycol cannot get there', () => {
    const f = one({ freezePointC: -30 }, { glycolType: 'propylene', designLowC: -50 });
    expect(f.status).toBe('short');
    expect(f.action).toMatch(/cannot reach/);
  });
  it('over 60 % glycol: flagged high with the dilution action', () => {
    const f = one({ glycolPercent: 62, freezePointC: -45 }, { glycolType: 'ethylene', designLowC: -30 });
    expect(f.status).toBe('high');
    expect(f.action).toMatch(/Dilute/);
  });
  it('the margin is a setting', () => {
    expect(judgeChemistry({ freezePointC: -21 }, ctx, { freezeMarginK: 0 })[0].status).toBe('ok');
    expect(judgeChemistry({ freezePointC: -21 }, ctx)[0].status).toBe('short');
  });
});

describe('all fields together, and limits', () => {
  it('one finding per measured field, in a fixed order', () => {
    const f = judgeChemistry({ nitritePpm: 1200, molybdatePpm: 500, ph: 9, reserveAlkalinityMl: 8, glycolPercent: 50 }, ctx);
    expect(f.map((x) => x.field)).toEqual(['nitritePpm', 'molybdatePpm', 'ph', 'reserveAlkalinityMl', 'freezeProtection']);
    expect(f.every((x) => x.action.length > 0)).toBe(true);
  });
  it('nothing measured: no findings', () => {
    expect(judgeChemistry({}, ctx)).toEqual([]);
  });
  it('defaults are as documented', () => {
    expect(DEFAULT_CHEMISTRY_LIMITS).toEqual({
      nitriteLowPpm: 800,
      nitriteHighPpm: 3200,
      molybdateLowPpm: 300,
      molybdateHighPpm: 1500,
      phLow: 7.5,
      phHigh: 11,
      reserveAlkalinityLowMl: 5,
      freezeMarginK: 5,
    });
  });
  it.each([
    [{ nitriteLowPpm: 3000, nitriteHighPpm: 2000 }, /nitriteHighPpm/],
    [{ phLow: -1 }, /phLow/],
    [{ freezeMarginK: Number.NaN }, /freezeMarginK/],
  ])('bad limits %# -> RangeError naming the field', (l, re) => {
    expect(() => resolveChemistryLimits(l)).toThrow(re);
  });
  it('bad readings -> RangeError naming the field', () => {
    expect(() => judgeChemistry({ nitritePpm: -1 }, ctx)).toThrow(/nitritePpm/);
    expect(() => judgeChemistry({ ph: 15 }, ctx)).toThrow(/ph/);
  });
});

describe('extended-life coolant', () => {
  it('nitrite and molybdate are not judged by the conventional limits (some extended-life coolants carry none); pH still is', () => {
    const f = judgeChemistry({ nitritePpm: 0, molybdatePpm: 0, ph: 7 }, { glycolType: 'ethylene', coolantFamily: 'extended-life', designLowC: null });
    expect(f.map((x) => [x.field, x.status])).toEqual([
      ['nitritePpm', 'unknown'],
      ['molybdatePpm', 'unknown'],
      ['ph', 'low'],
    ]);
    expect(f[0].action).toMatch(/coolant maker/);
  });
});

describe('signs of glycol breakdown (what they are: common practice, from memory; pH limit 7.5 ASTM D3306 / D6210, from memory)', () => {
  it('not looked at (null or absent): no finding', () => {
    expect(judgeChemistry({ breakdownSigns: null }, ctx)).toHaveLength(0);
    expect(judgeChemistry({}, ctx)).toHaveLength(0);
  });
  it('looked, none seen: ok; with a low pH it asks for a lab check instead', () => {
    expect(one({ breakdownSigns: [] })).toMatchObject({ field: 'breakdownSigns', status: 'ok' });
    const f = judgeChemistry({ breakdownSigns: [], ph: 7.4 }, ctx).find((x) => x.field === 'breakdownSigns')!;
    expect(f.status).toBe('unknown');
    expect(f.action).toMatch(/laboratory/);
    // the pH limit itself is in range: 7.5 is not low
    expect(judgeChemistry({ breakdownSigns: [], ph: 7.5 }, ctx).find((x) => x.field === 'breakdownSigns')!.status).toBe('ok');
  });
  it('signs seen: named in words, why it matters, and a drain, flush and refill with the cause found', () => {
    const f = judgeChemistry({ breakdownSigns: ['sour-smell', 'dark-colour', 'sour-smell'], ph: 7.0 }, ctx).find((x) => x.field === 'breakdownSigns')!;
    expect(f.status).toBe('signs');
    expect(f.message).toMatch(/sour or burnt smell, dark brown or black colour, with a low pH \(7\)/);
    expect(f.message).toMatch(/organic acids/);
    expect(f.action).toMatch(/drain, flush and refill/);
    expect(f.source).toMatch(/common practice/);
  });
  it('an unknown sign is refused naming the field', () => {
    expect(() => judgeChemistry({ breakdownSigns: ['green' as never] }, ctx)).toThrow(/breakdownSigns/);
  });
});
