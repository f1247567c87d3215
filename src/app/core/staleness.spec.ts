import { STALE_FLOOR_MS, ageText, isStale, staleAfterMs, staleText, usualInterval } from './staleness';

// Thresholds are common practice (3 x the usual interval, never under 30 s), not a published figure.
describe('staleness', () => {
  it('finds the usual interval as the median gap, ignoring one long outage', () => {
    expect(usualInterval([1000, 1000, 1000, 60_000, 1000])).toBe(1000);
    expect(usualInterval([60_000, 60_000, 60_000])).toBe(60_000);
    expect(usualInterval([1000, 2000])).toBeNull(); // too few to say
  });

  it('is stale after 3 x the usual interval, with a 30 s floor and a default while unknown', () => {
    expect(staleAfterMs(1000)).toBe(STALE_FLOOR_MS);
    expect(staleAfterMs(60_000)).toBe(180_000);
    expect(staleAfterMs(null)).toBe(30_000);
    const now = 1_000_000;
    expect(isStale(now - 29_000, now, 1000)).toBe(false);
    expect(isStale(now - 31_000, now, 1000)).toBe(true);
    expect(isStale(now - 120_000, now, 60_000)).toBe(false); // a gateway reporting each minute is not late yet
    expect(isStale(null, now, 1000)).toBe(false);
  });

  it('says when and how long ago in words', () => {
    expect(ageText(45_000)).toBe('45 s');
    expect(ageText(12 * 60_000)).toBe('12 min');
    const at = Date.UTC(2026, 11, 2, 18, 15); // 11:15 MST
    expect(staleText(at, at + 12 * 60_000, 'America/Denver')).toBe('last 11:15 MST · 12 min ago');
    expect(staleText(at, at + 3 * 86_400_000, 'America/Denver')).toBe('last 2026-12-02 11:15 MST · 3 d ago');
  });
});
