import request from 'supertest';
import { auth, makeTestApp, type TestApp } from './helpers';

// Expected buckets are computed here in plain JS from the same invented rows, independently of the SQL under test.
let t: TestApp;
let engineId: number;
const T0 = Date.UTC(2026, 0, 10, 0, 0, 0); // beyond 32 bits, as every real timestamp is
const MIN = 60_000;
const HOUR = 60 * MIN;

async function insertRows(table: string, cols: string[], rows: number[][]): Promise<void> {
  for (let i = 0; i < rows.length; i += 500) {
    const values = rows
      .slice(i, i + 500)
      .map((r) => `(${r.join(',')})`)
      .join(',');
    await t.ctx.sequelize.query(`INSERT INTO ${table} (${cols.join(',')}) VALUES ${values}`);
  }
}

beforeAll(async () => {
  t = await makeTestApp();
  const site = await t.ctx.models.Site.create({ name: 'Reading site', timeZone: 'Australia/Perth' });
  engineId = (
    await t.ctx.models.Engine.create({
      siteId: site.id,
      name: 'E',
      duty: 'standby',
      capacityL: 50,
      coolantFamily: 'conventional',
      glycolType: 'ethylene',
      glycolPercent: 50,
      capPressureKpa: 100,
      oilDrainIntervalH: 250,
    })
  ).id;
});
afterAll(() => t.close());

interface Expect {
  t: number;
  min: number;
  max: number;
  mean: number;
  count: number;
}

function bucketise(samples: { ts: number; min: number; max: number; sum: number; count: number }[], from: number, width: number): Expect[] {
  const by = new Map<number, { min: number; max: number; sum: number; count: number }>();
  for (const s of samples) {
    const k = Math.floor((s.ts - from) / width);
    const b = by.get(k) ?? { min: Infinity, max: -Infinity, sum: 0, count: 0 };
    b.min = Math.min(b.min, s.min);
    b.max = Math.max(b.max, s.max);
    b.sum += s.sum;
    b.count += s.count;
    by.set(k, b);
  }
  return [...by.entries()]
    .sort((a, b) => a[0] - b[0])
    .map(([k, b]) => ({ t: from + k * width, min: b.min, max: b.max, mean: b.sum / b.count, count: b.count }));
}

describe('GET /api/engines/:id/readings', () => {
  it('buckets raw good readings for a 2 h span', async () => {
    // one reading each 10 s for 3 h; every 7th is bad quality with a wild value that must not count
    const rows: number[][] = [];
    const good: { ts: number; min: number; max: number; sum: number; count: number }[] = [];
    for (let i = 0; i < 3 * 360; i++) {
      const ts = T0 + i * 10_000;
      const bad = i % 7 === 3;
      const value = bad ? 999 : 40 + ((i * 13) % 29) * 0.25;
      rows.push([engineId, 1, ts, value, bad ? 1 : 0]);
      if (!bad) good.push({ ts, min: value, max: value, sum: value, count: 1 });
      rows.push([engineId, 2, ts, 95, 0]); // another channel: must not leak in
    }
    await insertRows('readings', ['engine_id', 'channel', 'ts', 'value', 'quality'], rows);

    const from = T0 + 15 * MIN;
    const to = from + 2 * 3600_000;
    const res = await request(t.app)
      .get(`/api/engines/${engineId}/readings`)
      .query({ channel: 'coolant_temp', from: new Date(from).toISOString(), to: String(to), points: 12 })
      .set(auth(t.tokens.operator))
      .expect(200);
    expect(res.body.source).toBe('raw');
    const expected = bucketise(
      good.filter((g) => g.ts >= from && g.ts < to),
      from,
      10 * MIN,
    );
    expect(res.body.buckets).toHaveLength(12);
    expect(expected).toHaveLength(12);
    res.body.buckets.forEach((b: Expect, i: number) => {
      expect(b.t).toBe(expected[i].t);
      expect(b.count).toBe(expected[i].count);
      expect(b.min).toBe(expected[i].min);
      expect(b.max).toBe(expected[i].max);
      expect(b.mean).toBeCloseTo(expected[i].mean, 9);
    });
    expect(res.body.buckets.reduce((n: number, b: Expect) => n + b.count, 0)).toBe(good.filter((g) => g.ts >= from && g.ts < to).length);
  });

  it('aggregates the per-minute rollups for a 30-day span', async () => {
    // one rollup row each 5 minutes over 31 days; every 50th minute only bad readings (count 0)
    const rows: number[][] = [];
    const kept: { ts: number; min: number; max: number; sum: number; count: number }[] = [];
    const start = T0 - 31 * 24 * 60 * MIN;
    for (let m = 0; m < 31 * 24 * 12; m++) {
      const minute = start + m * 5 * MIN;
      if (m % 50 === 7) {
        rows.push([engineId, 1, minute, 'NULL' as unknown as number, 'NULL' as unknown as number, 0, 0, 60]);
        continue;
      }
      const count = 60 - (m % 5);
      const min = 38 + (m % 11) * 0.5;
      const max = min + 1 + (m % 3);
      const sum = count * (min + (max - min) * 0.4);
      rows.push([engineId, 1, minute, min, max, sum, count, m % 2]);
      kept.push({ ts: minute, min, max, sum, count });
    }
    await insertRows('rollups', ['engine_id', 'channel', 'minute', 'min', 'max', 'sum', 'count', 'bad_count'], rows);
    // the per-hour rollups as the writer keeps them beside (the same rows summed per hour, computed here)
    const hours = new Map<number, number[]>();
    for (const [, , minute, min, max, sum, count, bad] of rows) {
      const hour = minute - (minute % HOUR);
      const h = hours.get(hour);
      const isNull = (x: unknown) => (x as unknown as string) === 'NULL';
      if (!h) {
        hours.set(hour, [engineId, 1, hour, min, max, sum, count, bad]);
        continue;
      }
      if (!isNull(min) && (isNull(h[3]) || min < h[3])) h[3] = min;
      if (!isNull(max) && (isNull(h[4]) || max > h[4])) h[4] = max;
      h[5] += sum;
      h[6] += count;
      h[7] += bad;
    }
    await insertRows('rollups_hourly', ['engine_id', 'channel', 'hour', 'min', 'max', 'sum', 'count', 'bad_count'], [...hours.values()]);

    const to = T0 - 17_123; // not on a minute boundary
    const from = to - 30 * 24 * 3600_000;
    const check = async (points: number, unit: number, period: string) => {
      const res = await request(t.app)
        .get(`/api/engines/${engineId}/readings`)
        .query({ channel: 'coolant_temp', from, to, points })
        .set(auth(t.tokens.technician))
        .expect(200);
      expect({ source: res.body.source, period: res.body.rollupPeriod }).toEqual({ source: 'rollup', period });
      const alignedFrom = Math.floor(from / unit) * unit;
      const width = Math.ceil((to - alignedFrom) / unit / points) * unit;
      const expected = bucketise(
        kept.filter((k) => k.ts >= alignedFrom && k.ts < to),
        alignedFrom,
        width,
      );
      expect(res.body.buckets.length).toBe(expected.length);
      expect(expected.length).toBeGreaterThanOrEqual(Math.floor(Math.min(points, 30) * 0.9)); // whole hours: a few fewer than asked
      res.body.buckets.forEach((b: Expect, i: number) => {
        expect(b.t).toBe(expected[i].t);
        expect(b.count).toBe(expected[i].count);
        expect(b.min).toBe(expected[i].min);
        expect(b.max).toBe(expected[i].max);
        expect(b.mean).toBeCloseTo(expected[i].mean, 9);
      });
    };
    // chart width 30 or 700: a bucket spans half an hour or more, so whole hours from the per-hour rollups
    await check(30, HOUR, 'hour');
    await check(700, HOUR, 'hour');
    // 2,000 points: 22-minute buckets from the per-minute rollups
    await check(2000, MIN, 'minute');
  });

  it('returns no buckets for a span without data and 404 for an unknown engine', async () => {
    const res = await request(t.app)
      .get(`/api/engines/${engineId}/readings`)
      .query({ channel: 'engine_speed', from: T0, to: T0 + 3600_000 })
      .set(auth(t.tokens.planner))
      .expect(200);
    expect(res.body).toMatchObject({ source: 'raw', beyondRawRetention: false, buckets: [] });
    await request(t.app).get('/api/engines/9999/readings').query({ channel: 'coolant_temp' }).set(auth(t.tokens.planner)).expect(404);
  });
});
