/**
 * Make-up water limits: ASTM D6210 appendix X1 / ASTM D4985 (as reproduced in US Army TM 5-3895-383-24, table 15):
 * chloride <= 40 mg/L, sulfate <= 100 mg/L, hardness <= 170 mg/L as CaCO3, TDS <= 340 mg/L, pH 5.5 to 9.0.
 * TDS from conductivity: TDS ~ k x EC, k = 0.55 to 0.7 (Standard Methods 1030E).
 */
import { checkMakeUpWater } from '../../shared/coolant/make-up-water';

const good = { chlorideMgL: 20, sulfateMgL: 50, hardnessMgLCaCO3: 100, tdsMgL: 200, pH: 7.2 };
const item = (r: ReturnType<typeof checkMakeUpWater>, field: string) => r.items.find((i) => i.field === field)!;

describe('within every published limit (ASTM D6210 X1 / D4985)', () => {
  it('acceptable, no failures', () => {
    const r = checkMakeUpWater(good);
    expect(r.verdict).toBe('acceptable');
    expect(r.failures).toEqual([]);
    expect(r.source).toMatch(/D6210/);
  });
  it('values exactly at the limits pass (limits are "not more than")', () => {
    const r = checkMakeUpWater({ chlorideMgL: 40, sulfateMgL: 100, hardnessMgLCaCO3: 170, tdsMgL: 340, pH: 5.5 });
    expect(r.verdict).toBe('acceptable');
    expect(checkMakeUpWater({ ...good, pH: 9.0 }).verdict).toBe('acceptable');
  });
});

describe('each failing item, with a plain reason', () => {
  it.each([
    ['chlorideMgL', 41, /Chloride 41 mg\/L is above the limit of 40/],
    ['sulfateMgL', 101, /Sulfate 101 mg\/L is above the limit of 100/],
    ['hardnessMgLCaCO3', 171, /hardness 171 mg\/L as CaCO3 is above the limit of 170/],
    ['tdsMgL', 341, /341 mg\/L is above the limit of 340/],
    ['pH', 5.4, /pH 5.4 is below 5.5/],
    ['pH', 9.1, /pH 9.1 is above 9/],
  ])('%s = %f fails', (field, value, re) => {
    const r = checkMakeUpWater({ ...good, [field]: value });
    expect(r.verdict).toBe('not-acceptable');
    expect(item(r, field).status).toBe('fail');
    expect(r.failures).toHaveLength(1);
    expect(r.failures[0]).toMatch(re);
  });
  it('several failures are all listed', () => {
    const r = checkMakeUpWater({ chlorideMgL: 80, sulfateMgL: 150, hardnessMgLCaCO3: 300, tdsMgL: 900, pH: 9.5 });
    expect(r.failures).toHaveLength(5);
  });
});

describe('TDS estimated from conductivity (Standard Methods 1030E, k = 0.55 to 0.7), flagged as an estimate', () => {
  it('400 µS/cm -> 220 to 280 mg/L: passes, marked estimated with its range', () => {
    const r = checkMakeUpWater({ ...good, tdsMgL: undefined, conductivityUsCm: 400 });
    const t = item(r, 'tdsMgL');
    expect(t.status).toBe('pass');
    expect(t.estimated).toBe(true);
    expect(t.range!.low).toBeCloseTo(220, 10);
    expect(t.range!.high).toBeCloseTo(280, 10);
    expect(t.reason).toMatch(/estimated/);
    expect(r.verdict).toBe('acceptable');
  });
  it('700 µS/cm -> 385 to 490 mg/L: fails even at the low k', () => {
    const r = checkMakeUpWater({ ...good, tdsMgL: undefined, conductivityUsCm: 700 });
    expect(item(r, 'tdsMgL').status).toBe('fail');
    expect(r.verdict).toBe('not-acceptable');
  });
  it('550 µS/cm -> 302.5 to 385 mg/L straddles 340: uncertain, asks for a TDS measurement', () => {
    const r = checkMakeUpWater({ ...good, tdsMgL: undefined, conductivityUsCm: 550 });
    const t = item(r, 'tdsMgL');
    expect(t.status).toBe('uncertain');
    expect(t.range!.low).toBeCloseTo(302.5, 10);
    expect(t.range!.high).toBeCloseTo(385, 10);
    expect(r.verdict).toBe('incomplete');
  });
  it('a measured TDS wins over the estimate', () => {
    const r = checkMakeUpWater({ ...good, tdsMgL: 300, conductivityUsCm: 5000 });
    expect(item(r, 'tdsMgL').estimated).toBe(false);
    expect(item(r, 'tdsMgL').status).toBe('pass');
  });
});

describe('missing and bad input', () => {
  it('items not measured make the verdict incomplete, not acceptable', () => {
    const r = checkMakeUpWater({ chlorideMgL: 10 });
    expect(r.verdict).toBe('incomplete');
    expect(item(r, 'pH').status).toBe('not-measured');
  });
  it.each([
    [{ chlorideMgL: -1 }, /chlorideMgL/],
    [{ sulfateMgL: Number.NaN }, /sulfateMgL/],
    [{ pH: 15 }, /pH/],
    [{ conductivityUsCm: -5 }, /conductivityUsCm/],
    [{ hardnessMgLCaCO3: Number.POSITIVE_INFINITY }, /hardnessMgLCaCO3/],
  ])('bad input %# -> RangeError naming the field', (input, re) => {
    expect(() => checkMakeUpWater(input)).toThrow(RangeError);
    expect(() => checkMakeUpWater(input)).toThrow(re);
  });
});
