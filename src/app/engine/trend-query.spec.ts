import { channelsFromQuery } from './engine-page';
import { rangeFromQuery, rangeToQuery, sameRange } from './trend-range';

const NOW = Date.UTC(2026, 11, 2, 12, 0, 0);
const HOUR = 3600_000;

describe('trend range and channels in the address', () => {
  it('reads a preset, a custom window and nonsense (the default 24 h)', () => {
    expect(rangeFromQuery({ range: '7d' }, NOW)).toEqual({ preset: '7d', from: NOW - 7 * 24 * HOUR, to: NOW, live: true });
    expect(rangeFromQuery({}, NOW).preset).toBe('24h');
    expect(rangeFromQuery({ range: 'bogus' }, NOW).preset).toBe('24h');
    const custom = rangeFromQuery({ range: 'custom', from: '2026-12-01T08:00Z', to: '2026-12-01T20:30Z' }, NOW);
    expect(custom).toEqual({ preset: 'custom', from: Date.UTC(2026, 11, 1, 8), to: Date.UTC(2026, 11, 1, 20, 30), live: false });
    expect(rangeFromQuery({ range: 'custom', from: '2026-12-02T08:00Z', to: '2026-12-01T08:00Z' }, NOW).preset).toBe('24h');
  });

  it('writes a range back so that reading it gives the same range, and leaves the default out', () => {
    const custom = rangeFromQuery({ range: 'custom', from: '2026-12-01T08:00Z', to: '2026-12-01T20:30Z' }, NOW);
    const q = rangeToQuery(custom);
    expect(q).toEqual({ range: 'custom', from: '2026-12-01T08:00Z', to: '2026-12-01T20:30Z' });
    expect(sameRange(rangeFromQuery(q, NOW), custom)).toBe(true);
    expect(rangeToQuery(rangeFromQuery({}, NOW))).toEqual({ range: null, from: null, to: null });
    expect(rangeToQuery(rangeFromQuery({ range: '1h' }, NOW)).range).toBe('1h');
    expect(sameRange(rangeFromQuery({ range: '1h' }, NOW), rangeFromQuery({ range: '1h' }, NOW + 5000))).toBe(true);
  });

  it('reads the channels in their usual order; absent is the default three, empty is none', () => {
    expect(channelsFromQuery(undefined)).toEqual(['coolant_temp', 'coolant_pressure', 'coolant_conductivity']);
    expect(channelsFromQuery('engine_speed,coolant_temp,nonsense')).toEqual(['coolant_temp', 'engine_speed']);
    expect(channelsFromQuery('')).toEqual([]);
  });
});
