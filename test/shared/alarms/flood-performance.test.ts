import { floodPeriods, stepFlood, initialFloodState, ISA_18_2_FLOOD } from '../../../shared/alarms/flood';
import { alarmPerformance, AlarmActivation } from '../../../shared/alarms/performance';

const MIN = 60_000;
const HOUR = 60 * MIN;

describe('alarm flood (ISA-18.2 benchmark: begins above 10 alarms in 10 min, ends below 5 in 10 min)', () => {
  it('uses the ISA-18.2 figures', () => {
    expect(ISA_18_2_FLOOD).toEqual({ windowMs: 10 * MIN, beginAbove: 10, endBelow: 5 });
  });

  it('10 alarms in 10 minutes is not a flood; the 11th is', () => {
    const ten = Array.from({ length: 10 }, (_, i) => i * 30_000);
    expect(floodPeriods(ten)).toEqual([]);
    const eleven = [...ten, 5 * MIN + 30_000];
    const p = floodPeriods(eleven);
    expect(p).toHaveLength(1);
    expect(p[0].start).toBe(5 * MIN + 30_000);
  });

  it('ends at the exact moment fewer than 5 remain in the window', () => {
    // 12 alarms one every 30 s from 0 to 5.5 min: flood begins at the 11th (5 min).
    const times = Array.from({ length: 12 }, (_, i) => i * 30_000);
    const [p] = floodPeriods(times);
    expect(p.start).toBe(5 * MIN);
    // The count falls below 5 when the 8th alarm (3.5 min) leaves: 13.5 min (4 left: 4, 4.5, 5, 5.5 min).
    expect(p.end).toBe(3.5 * MIN + 10 * MIN);
    expect(p.peakCount).toBe(12);
    expect(p.alarms).toBe(12);
  });

  it('hysteresis: 5 to 10 alarms in the window keeps a flood going', () => {
    let s = initialFloodState();
    const events: string[] = [];
    const feed = (ts: number, alarm = true) => {
      const r = stepFlood(s, { ts, alarm });
      s = r.state;
      events.push(...r.events.map((e) => `${e.kind}@${e.ts / MIN}`));
    };
    for (let i = 0; i < 11; i++) feed(i * MIN * 0.5); // 0..5 min: begins at 5 min
    for (let t = 10; t <= 60; t += 1.5) feed(t * MIN); // ~6-7 in any 10 min: stays flooding
    feed(200 * MIN, false);
    expect(events[0]).toBe('flood-begin@5');
    expect(events.filter((e) => e.startsWith('flood-end'))).toHaveLength(1);
    expect(events).toHaveLength(2);
  });
});

describe('alarm performance figures', () => {
  const day0 = Date.UTC(2026, 0, 5);
  const acts: AlarmActivation[] = [
    // chattering: 3 activations within 40 s, twice
    { key: 'e1/temp-high', activatedAt: day0 + 1 * HOUR, acknowledgedAt: day0 + 1 * HOUR + 60_000 },
    { key: 'e1/temp-high', activatedAt: day0 + 1 * HOUR + 20_000, acknowledgedAt: day0 + 1 * HOUR + 80_000 },
    { key: 'e1/temp-high', activatedAt: day0 + 1 * HOUR + 40_000, acknowledgedAt: day0 + 1 * HOUR + 340_000 },
    { key: 'e1/temp-high', activatedAt: day0 + 5 * HOUR },
    { key: 'e1/temp-high', activatedAt: day0 + 5 * HOUR + 10_000 },
    { key: 'e1/temp-high', activatedAt: day0 + 5 * HOUR + 50_000 },
    // 3 within 2 minutes: not chattering by the 3-in-1-minute definition
    { key: 'e2/pressure-low', activatedAt: day0 + 10 * HOUR },
    { key: 'e2/pressure-low', activatedAt: day0 + 10 * HOUR + 55_000 },
    { key: 'e2/pressure-low', activatedAt: day0 + 10 * HOUR + 110_000 },
    // standing: active since the day before, never cleared
    { key: 'e3/no-data', activatedAt: day0 - 6 * HOUR, acknowledgedAt: day0 - 5 * HOUR },
    { key: 'e4/conductivity', activatedAt: day0 + 2 * HOUR, acknowledgedAt: day0 + 2 * HOUR + 120_000, clearedAt: day0 + 3 * HOUR },
  ];
  const r = alarmPerformance(acts, { from: day0, to: day0 + 24 * HOUR });

  it('counts alarms per day and per 10 minutes within the period', () => {
    expect(r.total).toBe(10);
    expect(r.perDay).toBe(10);
    expect(r.per10Min).toBeCloseTo(10 / 144, 12);
    expect(r.max10Min).toBe(3);
    expect(r.share10MinOver10).toBe(0);
  });

  it('ranks the most frequent alarms', () => {
    expect(r.mostFrequent.slice(0, 2)).toEqual([
      { key: 'e1/temp-high', count: 6, share: 0.6 },
      { key: 'e2/pressure-low', count: 3, share: 0.3 },
    ]);
  });

  it('finds chattering alarms (>= 3 activations in 1 minute, common practice)', () => {
    expect(r.chattering).toEqual([{ key: 'e1/temp-high', bursts: 2, maxInWindow: 3 }]);
  });

  it('finds standing alarms (active > 24 h at the end of the period)', () => {
    expect(r.standing).toEqual([{ key: 'e3/no-data', activatedAt: day0 - 6 * HOUR, activeMs: 30 * HOUR }]);
  });

  it('mean and median time to acknowledge', () => {
    // 60 s, 60 s, 300 s, 120 s
    expect(r.acknowledge.count).toBe(4);
    expect(r.acknowledge.meanMs).toBe(135_000);
    expect(r.acknowledge.medianMs).toBe(90_000);
    expect(r.acknowledge.unacknowledged).toBe(6);
  });
});
