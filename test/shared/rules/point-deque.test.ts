import { createPointDeque, dequePoints, popBack, popFront, pushBack, tsAt, valueAt, type PointDeque } from '../../../shared/rules/point-deque';
import { initialStuckState, stepStuck, type StuckRuleParams, type StuckRuleState } from '../../../shared/rules/stuck-rule';
import { S } from './run-rule';

const times = (q: PointDeque) => dequePoints(q).map((p) => p.ts);

describe('point deque (ring buffer)', () => {
  it('keeps order across the wrap-around of its ring', () => {
    const q = createPointDeque(4);
    for (const t of [1, 2, 3]) pushBack(q, t, t * 10);
    expect(popFront(q)).toBe(1);
    expect(popFront(q)).toBe(2);
    for (const t of [4, 5, 6]) pushBack(q, t, t * 10); // indices 3, 0, 1: wrapped
    expect(q.ts).toHaveLength(4);
    expect(q.head).toBe(2);
    expect(times(q)).toEqual([3, 4, 5, 6]);
    expect([tsAt(q, 0), valueAt(q, 0), tsAt(q, 3), valueAt(q, 3)]).toEqual([3, 30, 6, 60]);
    popBack(q);
    expect(times(q)).toEqual([3, 4, 5]);
  });

  it('grows when full while wrapped, and the points stay in order', () => {
    const q = createPointDeque(4);
    for (const t of [1, 2, 3, 4]) pushBack(q, t, -t);
    popFront(q);
    popFront(q);
    for (const t of [5, 6, 7, 8, 9]) pushBack(q, t, -t); // full at 8 (wrapped), grows at 9
    expect(q.ts.length).toBe(8);
    expect(dequePoints(q)).toEqual([3, 4, 5, 6, 7, 8, 9].map((t) => ({ ts: t, value: -t })));
    for (let t = 10; t < 100; t++) pushBack(q, t, -t);
    expect(q.ts.length).toBe(128);
    expect(times(q)).toEqual(Array.from({ length: 97 }, (_, i) => i + 3));
  });

  it('empty: popping does nothing, popFront says undefined', () => {
    const q = createPointDeque();
    expect(popFront(q)).toBeUndefined();
    popBack(q);
    expect(q.length).toBe(0);
    pushBack(q, 7, 1);
    popBack(q);
    popBack(q);
    expect(q.length).toBe(0);
    expect(popFront(q)).toBeUndefined();
    pushBack(q, 8, 2);
    expect(dequePoints(q)).toEqual([{ ts: 8, value: 2 }]);
  });

  it('survives a JSON round trip in the middle of a wrap and goes on from there', () => {
    const q = createPointDeque(4);
    for (const t of [1, 2, 3, 4]) pushBack(q, t, t);
    popFront(q);
    popFront(q);
    pushBack(q, 5, 5);
    const copy: PointDeque = JSON.parse(JSON.stringify(q));
    pushBack(copy, 6, 6);
    pushBack(copy, 7, 7); // grows
    expect(times(copy)).toEqual([3, 4, 5, 6, 7]);
    expect(times(q)).toEqual([3, 4, 5]); // the original is a separate value
  });
});

/**
 * The stuck rule's flat run by brute force: every point of the run kept in an array, the extremes found by
 * scanning it (the newest occurrence of the maximum and of the minimum, as the monotonic queues keep), and the
 * older extreme dropped, with everything before it, while max - min exceeds the band.
 */
function bruteRun(points: { ts: number; value: number }[], band: number, runStart: number): { points: typeof points; runStart: number; moved: boolean } {
  let run = points;
  let moved = false;
  for (;;) {
    let hi = 0;
    let lo = 0;
    for (let i = 0; i < run.length; i++) {
      if (run[i].value >= run[hi].value) hi = i;
      if (run[i].value <= run[lo].value) lo = i;
    }
    if (run[hi].value - run[lo].value <= band) return { points: run, runStart, moved };
    runStart = run[Math.min(hi, lo)].ts;
    moved = true;
    run = run.filter((p) => p.ts > runStart);
  }
}

describe('stuck rule: sliding min/max over the flat run (ring buffers)', () => {
  const p: StuckRuleParams = { epsilon: 0.3, durationS: 120, resolution: 0.01, label: 'Coolant temperature', unit: '°C' };

  /** Runs the rule and the brute-force run side by side; checks run start and extremes after every reading. */
  function compare(readings: { ts: number; value: number; running?: boolean }[], params = p) {
    let state: StuckRuleState = initialStuckState();
    let run: { ts: number; value: number }[] = [];
    let runStart: number | null = null;
    let lastTs = -Infinity;
    const kinds: string[] = [];
    for (const r of readings) {
      const res = stepStuck(state, { ...r, quality: 0 }, params);
      state = res.state;
      kinds.push(...res.events.map((e) => e.kind));
      if (r.ts <= lastTs) continue; // out of order or repeated time: ignored by the rule
      lastTs = r.ts;
      const b = bruteRun([...run, { ts: r.ts, value: r.value }], Math.max(params.epsilon, params.resolution ?? 0), runStart ?? r.ts);
      run = b.points;
      runStart = b.runStart;
      expect(state.runStart).toBe(runStart);
      expect(valueAt(state.maxQ, 0)).toBe(Math.max(...run.map((x) => x.value)));
      expect(valueAt(state.minQ, 0)).toBe(Math.min(...run.map((x) => x.value)));
      expect(tsAt(state.maxQ, state.maxQ.length - 1)).toBe(r.ts);
    }
    return { state, kinds };
  }

  it('window expiry: an old extreme leaves the run when a new value takes the range past the band', () => {
    // 80.00 at 0 s, 80.20 at 10 s, 80.10 at 20 s, then 80.35: 80.35 - 80.00 > 0.3, so the run restarts after 0 s
    const { state } = compare([80, 80.2, 80.1, 80.35].map((value, i) => ({ ts: i * 10 * S, value })));
    expect(state.runStart).toBe(0);
    expect(dequePoints(state.maxQ)).toEqual([{ ts: 30 * S, value: 80.35 }]);
    expect(dequePoints(state.minQ)).toEqual([
      { ts: 20 * S, value: 80.1 },
      { ts: 30 * S, value: 80.35 },
    ]);
    // then 80.45: 80.45 - 80.10 > 0.3, so 80.10 (20 s) leaves and the run now starts at 20 s
    const next = stepStuck(state, { ts: 40 * S, value: 80.45, quality: 0 }, p).state;
    expect(next.runStart).toBe(20 * S);
    expect(dequePoints(next.minQ).map((x) => x.value)).toEqual([80.35, 80.45]);
  });

  it('a slow rise within the band grows the minimum queue past its first capacity (wrap and growth on the way)', () => {
    const rise = Array.from({ length: 200 }, (_, i) => ({ ts: i * S, value: 80 + i * 0.001 }));
    const { state } = compare(rise);
    expect(state.runStart).toBe(0);
    expect(state.minQ.length).toBe(200);
    expect(state.maxQ.length).toBe(1);
    // then a jump past the band empties the rise from the front, point by point: the run starts after 199 s
    const after = stepStuck(state, { ts: 200 * S, value: 80.5, quality: 0 }, p).state;
    expect(dequePoints(after.minQ)).toEqual([{ ts: 200 * S, value: 80.5 }]);
    expect(after.runStart).toBe(199 * S);
  });

  it('gaps in time, repeated and out-of-order times: the same run as the brute force, on a pseudo-random walk', () => {
    let seed = 12345;
    const rnd = () => (seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648;
    let ts = 0;
    let v = 85;
    const readings: { ts: number; value: number; running: boolean }[] = [];
    for (let i = 0; i < 3000; i++) {
      const u = rnd();
      ts += u < 0.05 ? 3600 * S : u < 0.1 ? 0 : u < 0.12 ? -5 * S : Math.ceil(rnd() * 10) * S; // gap, repeat, older, normal
      v = Math.round((v + (rnd() - 0.5) * (i % 500 < 250 ? 0.05 : 0.6)) * 100) / 100; // quiet stretches and moving ones
      readings.push({ ts, value: v, running: i % 700 < 350 });
    }
    const { kinds } = compare(readings);
    expect(kinds.filter((k) => k === 'raise').length).toBeGreaterThan(0);
    expect(kinds.length).toBeGreaterThan(1);
  });

  it('the state stays plain data: a JSON copy steps on like the original', () => {
    const seq = Array.from({ length: 50 }, (_, i) => ({ ts: i * S, value: 80 + ((i * 7) % 5) * 0.05, quality: 0 as const }));
    let a = initialStuckState();
    for (const r of seq.slice(0, 30)) a = stepStuck(a, r, p).state;
    let b: StuckRuleState = JSON.parse(JSON.stringify(a));
    for (const r of seq.slice(30)) {
      a = stepStuck(a, r, p).state;
      b = stepStuck(b, r, p).state;
    }
    expect(JSON.parse(JSON.stringify(b))).toEqual(JSON.parse(JSON.stringify(a)));
    expect(dequePoints(b.maxQ)).toEqual(dequePoints(a.maxQ));
  });
});
