// Zone rules from the IANA time zone database as the runtime ships it (America/Denver MST UTC-7, Asia/Tokyo JST UTC+9).
import { trendAxisLabel } from './trend-axis';

describe('trendAxisLabel', () => {
  // 2026-12-02 21:05 UTC is 14:05 MST in Denver (UTC-7 in winter) and 06:05 next day JST in Tokyo.
  const t = Date.UTC(2026, 11, 2, 21, 5);

  it('labels in the given zone, not the browser zone', () => {
    expect(trendAxisLabel(t, 3600_000, 'America/Denver')).toBe('14:05');
    expect(trendAxisLabel(t, 3600_000, 'Asia/Tokyo')).toBe('06:05');
  });

  it('adds the date for windows longer than a day and a half', () => {
    expect(trendAxisLabel(t, 7 * 86_400_000, 'America/Denver')).toBe('12-02 14:05');
    expect(trendAxisLabel(t, 7 * 86_400_000, 'Asia/Tokyo')).toBe('12-03 06:05');
  });

  it('gives nothing for a non-number', () => {
    expect(trendAxisLabel(Number.NaN, 3600_000, 'UTC')).toBe('');
  });
});
