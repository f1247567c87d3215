import { standbyReadiness, STANDBY_MIN_TEMP_C, type ReadinessFacts } from '../../shared/readiness/standby-readiness';

const NOW = Date.UTC(2026, 11, 2, 12, 0, 0);
const ok: ReadinessFacts = {
  outOfService: false,
  coolantTempC: 40,
  coolantTs: NOW - 5_000,
  lastSeenAt: NOW - 5_000,
  running: false,
  minTempC: STANDBY_MIN_TEMP_C,
  urgentAlarms: [],
  lockouts: [],
  staleAfterMs: 5 * 60_000,
  now: NOW,
};

describe('standby readiness', () => {
  it('warm, fresh, no alarm, no lockout: ready', () => {
    expect(standbyReadiness(ok)).toEqual({ ready: true, reasons: [] });
  });

  it('below the minimum (32 °C, about 90 °F: the NFPA 110 heater minimum, quoted from memory) while stopped: not ready, both units in words', () => {
    const r = standbyReadiness({ ...ok, coolantTempC: 28 });
    expect(r.ready).toBe(false);
    expect(r.reasons).toEqual(['Jacket water cold: 28.0 °C (82.4 °F), below the 32.0 °C (89.6 °F) needed to start and take load at once']);
    expect(standbyReadiness({ ...ok, coolantTempC: 28, running: true }).ready).toBe(true);
  });

  it('every reason is listed: out of service, stale data, urgent alarm, open lockout', () => {
    const r = standbyReadiness({
      ...ok,
      outOfService: true,
      lastSeenAt: NOW - 12 * 60_000,
      coolantTs: NOW - 12 * 60_000,
      coolantTempC: 10,
      urgentAlarms: [{ title: 'Coolant pressure falling while stopped', priority: 'high' }],
      lockouts: [{ workOrderId: 7, title: 'Replace thermostat' }],
    });
    expect(r).toEqual({
      ready: false,
      reasons: [
        'Out of service',
        'Data stale: last reading 12 min ago',
        'Active high alarm: Coolant pressure falling while stopped',
        'Lockout open on work order 7 (Replace thermostat)',
      ],
    });
  });

  it('never heard from: not ready, state not known', () => {
    expect(standbyReadiness({ ...ok, lastSeenAt: null, coolantTs: null, coolantTempC: null }).reasons).toEqual([
      'No data from the engine: its state is not known',
    ]);
  });
});

describe('standby readiness when the data is declared lost', () => {
  it('says Not ready with the reason in words (common practice: an engine whose state is not known is not ready)', () => {
    const r = standbyReadiness({
      outOfService: false,
      coolantTempC: null,
      coolantTs: null,
      lastSeenAt: 1_000,
      running: false,
      dataLost: true,
      minTempC: 32,
      urgentAlarms: [],
      lockouts: [],
      staleAfterMs: 300_000,
      now: 2_000,
    });
    expect(r.ready).toBe(false);
    expect(r.reasons.join(' ')).toMatch(/data lost/);
  });
});
