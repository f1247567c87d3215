import { formatInZone, wallTimeToUtc, zoneAbbreviation } from './time-format';

// Zone rules from the IANA time zone database as the browser ships it (America/Denver: MST UTC-7, MDT UTC-6
// from the second Sunday of March; Europe/Berlin: CET UTC+1).
describe('time format', () => {
  const t = Date.UTC(2026, 11, 2, 21, 5, 9); // 2026-12-02 21:05:09 UTC

  it('writes one ISO-like 24-hour format in the zone asked for, with its abbreviation', () => {
    expect(formatInZone(t, 'America/Denver')).toBe('2026-12-02 14:05 MST');
    expect(formatInZone(t, 'America/Denver', 'datetime-s')).toBe('2026-12-02 14:05:09 MST');
    expect(formatInZone(t, 'America/Denver', 'time')).toBe('14:05 MST');
    expect(formatInZone(t, 'America/Denver', 'time-s', false)).toBe('14:05:09');
    expect(formatInZone(t, 'UTC', 'datetime')).toBe('2026-12-02 21:05 UTC');
    expect(formatInZone(t, 'America/Denver', 'date')).toBe('2026-12-02');
    expect(formatInZone(new Date(t).toISOString(), 'America/Denver')).toBe('2026-12-02 14:05 MST');
  });

  it('keeps a bare calendar date as the day it names', () => {
    expect(formatInZone('2026-11-02', 'America/Denver', 'date')).toBe('2026-11-02');
    expect(formatInZone('2026-11-02', 'Asia/Tokyo', 'datetime')).toBe('2026-11-02');
  });

  it('midnight is 00, never 24', () => {
    expect(formatInZone(Date.UTC(2026, 11, 2, 7, 0), 'America/Denver', 'datetime')).toBe('2026-12-02 00:00 MST');
  });

  it('says nothing for a missing time and falls back to the browser zone for an unknown zone', () => {
    expect(formatInZone(null, 'UTC')).toBe('—');
    expect(formatInZone('not a time', 'UTC')).toBe('—');
    expect(formatInZone(t, 'Not/AZone')).toMatch(/^2026-12-0[23] \d{2}:05 \S+/);
  });

  it('knows summer time', () => {
    expect(zoneAbbreviation(Date.UTC(2026, 6, 1), 'America/Denver')).toBe('MDT');
    expect(zoneAbbreviation(t, 'America/Denver')).toBe('MST');
  });

  it('reads a wall-clock time in a zone as the right instant, across the change to summer time', () => {
    expect(new Date(wallTimeToUtc(2026, 3, 7, 12, 0, 0, 'America/Denver')).toISOString()).toBe('2026-03-07T19:00:00.000Z');
    expect(new Date(wallTimeToUtc(2026, 3, 9, 12, 0, 0, 'America/Denver')).toISOString()).toBe('2026-03-09T18:00:00.000Z');
    expect(new Date(wallTimeToUtc(2026, 12, 2, 14, 5, 0, 'Europe/Berlin')).toISOString()).toBe('2026-12-02T13:05:00.000Z');
  });
});
