import { checkCoverage, overlapsOf, uncoveredSpans, type CoverShift } from '../../../shared/oncall/coverage';

const H = 3_600_000;
const T0 = Date.UTC(2030, 2, 4); // a Monday, 00:00 UTC
const shift = (id: number, userId: number, fromH: number, toH: number): CoverShift => ({ id, userId, startsAt: T0 + fromH * H, endsAt: T0 + toH * H });

describe('on-call coverage', () => {
  it('finds no gap when shifts hand over end to start', () => {
    expect(uncoveredSpans([shift(1, 1, 0, 12), shift(2, 2, 12, 24)], T0, T0 + 24 * H)).toEqual([]);
  });

  it('finds the hours before, between and after the shifts', () => {
    const gaps = uncoveredSpans([shift(1, 1, 2, 8), shift(2, 2, 10, 20)], T0, T0 + 24 * H);
    expect(gaps.map((g) => [(g.from - T0) / H, (g.to - T0) / H])).toEqual([
      [0, 2],
      [8, 10],
      [20, 24],
    ]);
  });

  it('merges overlapping and nested shifts before looking for gaps', () => {
    const gaps = uncoveredSpans([shift(1, 1, 0, 10), shift(2, 2, 2, 5), shift(3, 3, 8, 14)], T0, T0 + 16 * H);
    expect(gaps.map((g) => [(g.from - T0) / H, (g.to - T0) / H])).toEqual([[14, 16]]);
  });

  it('an empty rota leaves the whole window uncovered; shifts outside it do not count', () => {
    expect(uncoveredSpans([], T0, T0 + H)).toEqual([{ from: T0, to: T0 + H }]);
    expect(uncoveredSpans([shift(1, 1, -10, -2), shift(2, 1, 30, 40)], T0, T0 + 24 * H)).toEqual([{ from: T0, to: T0 + 24 * H }]);
  });

  it('reports the overlapping part, and whether it is the same person twice', () => {
    const list = [shift(1, 1, 0, 12), shift(2, 2, 11, 23)];
    const o = overlapsOf(shift(3, 1, 10, 14), list);
    expect(o.map((x) => [x.other.id, (x.from - T0) / H, (x.to - T0) / H, x.samePerson])).toEqual([
      [1, 10, 12, true],
      [2, 11, 14, false],
    ]);
  });

  it('touching shifts (one ends when the next starts) do not overlap', () => {
    expect(overlapsOf(shift(3, 1, 12, 24), [shift(1, 2, 0, 12)])).toEqual([]);
  });

  it('a changed shift is not compared with its old self', () => {
    const list = [shift(1, 1, 0, 12), shift(2, 2, 12, 24)];
    const r = checkCoverage(shift(1, 1, 0, 10), list, { from: T0, to: T0 + 24 * H });
    expect(r.overlaps).toEqual([]);
    expect(r.uncovered.map((g) => [(g.from - T0) / H, (g.to - T0) / H])).toEqual([[10, 12]]);
  });

  it('a new shift over another gives an overlap and fills the gap it covers', () => {
    const list = [shift(1, 1, 0, 12)];
    const r = checkCoverage({ id: null, userId: 2, startsAt: T0 + 8 * H, endsAt: T0 + 20 * H }, list, { from: T0, to: T0 + 24 * H });
    expect(r.overlaps).toHaveLength(1);
    expect(r.uncovered.map((g) => [(g.from - T0) / H, (g.to - T0) / H])).toEqual([[20, 24]]);
  });

  it('the default window is the 7 days from the start of the shift day', () => {
    const r = checkCoverage(shift(1, 1, 0, 7 * 24), []);
    expect(r.uncovered).toEqual([]);
  });
});
