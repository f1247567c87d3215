/** Retention of raw readings: old rows removed in batches, rollups kept, and the readings API says where a range comes from. */
import fs from 'node:fs';
import request from 'supertest';
import { QueryTypes } from 'sequelize';
import { DAY_MS, startRetention } from '../../server/services/retention';
import { auth, makeTestApp, type TestApp } from './helpers';
import { Db, seedFleet, startServerProcess } from './support/telemetry-server';
import { engineFields } from './support/engine-fields';

let t: TestApp;
let e1: number;
let e2: number;
const MIN = 60_000;
const NOW = Date.now();
const DAYS = 400;
const CUTOFF = NOW - DAYS * DAY_MS;

async function insertRows(table: string, cols: string[], rows: number[][]): Promise<void> {
  for (let i = 0; i < rows.length; i += 500) {
    const values = rows
      .slice(i, i + 500)
      .map((r) => `(${r.join(',')})`)
      .join(',');
    await t.ctx.sequelize.query(`INSERT INTO ${table} (${cols.join(',')}) VALUES ${values}`);
  }
}
/** One row; numbers as numbers (PostgreSQL returns COUNT and BIGINT columns as strings). */
const one = async <T extends object = { n: number }>(sql: string): Promise<T> => {
  const row = (await t.ctx.sequelize.query<Record<string, unknown>>(sql, { type: QueryTypes.SELECT }))[0]!;
  return Object.fromEntries(Object.entries(row).map(([k, v]) => [k, typeof v === 'string' && /^-?\d+(\.\d+)?$/.test(v) ? Number(v) : v])) as T;
};

// old raw rows: engine 1 coolant_temp 10,500 (11 batches of at most 1,000), engine 1 pressure 999 (1 batch), engine 2 coolant_temp 1,000 (1 batch)
const OLD = [
  { engine: () => e1, channel: 1, n: 10_500 },
  { engine: () => e1, channel: 2, n: 999 },
  { engine: () => e2, channel: 1, n: 1_000 },
];
const OLD_START = CUTOFF - 30 * DAY_MS;

beforeAll(async () => {
  t = await makeTestApp();
  const site = await t.ctx.models.Site.create({ name: 'Retention site', timeZone: 'Europe/Oslo' });
  e1 = (await t.ctx.models.Engine.create({ siteId: site.id, name: 'R1', ...engineFields })).id;
  e2 = (await t.ctx.models.Engine.create({ siteId: site.id, name: 'R2', ...engineFields })).id;
  const rows: number[][] = [];
  for (const o of OLD) for (let i = 0; i < o.n; i++) rows.push([o.engine(), o.channel, OLD_START + i * 10_000, 60 + (i % 10), 0]);
  // the edge: one millisecond before the cutoff goes, the cutoff itself stays
  rows.push([e2, 2, CUTOFF - 1, 70, 0]);
  rows.push([e2, 2, CUTOFF, 71, 0]);
  // recent rows of every pair stay
  for (const [e, ch] of [
    [e1, 1],
    [e1, 2],
    [e2, 1],
    [e2, 2],
  ])
    for (let i = 0; i < 300; i++) rows.push([e, ch, NOW - 2 * 3600_000 + i * 10_000, 80, 0]);
  await insertRows('readings', ['engine_id', 'channel', 'ts', 'value', 'quality'], rows);
  // rollups: the old first hour of engine 1 coolant_temp, and one recent minute
  const rollups: number[][] = [];
  const oldMinute = Math.floor(OLD_START / MIN) * MIN;
  for (let m = 0; m < 60; m++) rollups.push([e1, 1, oldMinute + m * MIN, 60, 69, 6 * 64.5, 6, 0]);
  rollups.push([e1, 1, Math.floor(NOW / MIN) * MIN - 10 * MIN, 80, 80, 480, 6, 0]);
  await insertRows('rollups', ['engine_id', 'channel', 'minute', '"min"', '"max"', '"sum"', '"count"', 'bad_count'], rollups);
});
afterAll(() => t.close());

describe('retention of raw readings', () => {
  it('removes only raw readings older than the retention, in batches, and leaves the rollups alone', async () => {
    const rollupsBefore = await one<{ n: number; s: number }>('SELECT COUNT(*) AS n, SUM("sum") + SUM("count") + SUM(minute % 1000003) AS s FROM rollups');
    const keptBefore = await one<{ n: number }>(`SELECT COUNT(*) AS n FROM readings WHERE ts >= ${CUTOFF}`);
    const retention = startRetention({
      sequelize: t.ctx.sequelize,
      log: t.ctx.log,
      timer: false,
      now: () => NOW,
      config: { rawRetentionDays: DAYS, retentionBatch: 1000, retentionPauseMs: 0, retentionEveryMs: 3600_000 },
    });
    const result = await retention.sweep();
    await retention.stop();

    const oldCount = OLD.reduce((n, o) => n + o.n, 0) + 1;
    expect(result.complete).toBe(true);
    expect(result.deleted).toBe(oldCount);
    // 12,500 rows in steps of at most 1,000 rows: 12 full steps and a last one of 500
    expect(result.batches).toBe(13);
    expect(result.cutoff).toBe(CUTOFF);

    expect((await one<{ n: number }>(`SELECT COUNT(*) AS n FROM readings WHERE ts < ${result.cutoff}`)).n).toBe(0);
    expect((await one<{ n: number }>(`SELECT COUNT(*) AS n FROM readings`)).n).toBe(keptBefore.n);
    expect((await one<{ n: number }>(`SELECT COUNT(*) AS n FROM readings WHERE engine_id = ${e2} AND channel = 2 AND ts = ${CUTOFF}`)).n).toBe(1);
    expect(await one('SELECT COUNT(*) AS n, SUM("sum") + SUM("count") + SUM(minute % 1000003) AS s FROM rollups')).toEqual(rollupsBefore);

    // a second sweep finds nothing
    const again = startRetention({
      sequelize: t.ctx.sequelize,
      log: t.ctx.log,
      timer: false,
      now: () => NOW,
      config: { rawRetentionDays: DAYS, retentionBatch: 1000, retentionPauseMs: 0, retentionEveryMs: 3600_000 },
    });
    expect((await again.sweep()).deleted).toBe(0);
    await again.stop();
  });

  it('RAW_RETENTION_DAYS=0 keeps raw readings for good', async () => {
    const before = await one<{ n: number }>('SELECT COUNT(*) AS n FROM readings');
    const r = startRetention({
      sequelize: t.ctx.sequelize,
      log: t.ctx.log,
      timer: false,
      config: { rawRetentionDays: 0, retentionBatch: 10, retentionPauseMs: 0, retentionEveryMs: 3600_000 },
    });
    expect(await r.sweep()).toEqual({ deleted: 0, deletedCompacted: 0, batches: 0, cutoff: null, complete: true });
    await r.stop();
    expect(await one('SELECT COUNT(*) AS n FROM readings')).toEqual(before);
  });
});

describe('readings API and the raw retention', () => {
  it('answers a range older than the raw retention from the rollups and says so', async () => {
    expect(t.ctx.config.rawRetentionDays).toBe(400); // the default
    const from = Math.floor(OLD_START / MIN) * MIN;
    const before = Date.now();
    const res = await request(t.app)
      .get(`/api/engines/${e1}/readings`)
      .query({ channel: 'coolant_temp', from: String(from), to: String(from + 3600_000), points: 60 })
      .set(auth(t.tokens.operator))
      .expect(200);
    expect(res.body.source).toBe('rollup'); // one hour, but before the retention: rollups, not raw
    expect(res.body.beyondRawRetention).toBe(true);
    expect(res.body.rawRetentionDays).toBe(400);
    expect(res.body.rawKeptFrom).toBeGreaterThanOrEqual(before - 400 * DAY_MS);
    expect(res.body.rawKeptFrom).toBeLessThanOrEqual(Date.now() - 400 * DAY_MS);
    expect(res.body.buckets).toHaveLength(60);
    expect(res.body.buckets[0]).toEqual({ t: from, min: 60, max: 69, mean: 64.5, count: 6 });
  });

  it('answers a recent short range from raw readings', async () => {
    const res = await request(t.app)
      .get(`/api/engines/${e1}/readings`)
      .query({ channel: 'coolant_temp', from: String(NOW - 2 * 3600_000), to: String(NOW), points: 10 })
      .set(auth(t.tokens.operator))
      .expect(200);
    expect(res.body.source).toBe('raw');
    expect(res.body.beyondRawRetention).toBe(false);
    expect(res.body.buckets.reduce((n: number, b: { count: number }) => n + b.count, 0)).toBe(300);
  });
});

describe('retention in the running server', () => {
  it('sweeps old raw readings on its timer and keeps the rollups', async () => {
    const server = await startServerProcess({ env: { RAW_RETENTION_DAYS: '30', RETENTION_EVERY_S: '1', RETENTION_BATCH: '250', RETENTION_PAUSE_MS: '10' } });
    const db = new Db(server.databaseUrl);
    try {
      const [d] = await seedFleet(db, 1, 'ret');
      const old = Date.now() - 31 * DAY_MS;
      const recent = Date.now() - 29 * DAY_MS;
      const values = [];
      for (let i = 0; i < 1000; i++) values.push(`(${d.engineId}, 1, ${old + i * 1000}, 80, 0)`, `(${d.engineId}, 1, ${recent + i * 1000}, 81, 0)`);
      await db.exec(`INSERT INTO readings (engine_id, channel, ts, value, quality) VALUES ${values.join(',')}`);
      await db.exec(
        `INSERT INTO rollups (engine_id, channel, minute, "min", "max", "sum", "count", bad_count) VALUES (${d.engineId}, 1, ${Math.floor(old / MIN) * MIN}, 80, 80, 4800, 60, 0)`,
      );
      const deadline = Date.now() + 30_000;
      while ((await db.get<{ n: number }>('SELECT COUNT(*) AS n FROM readings WHERE ts < ?', [old + 1000 * 1000])).n > 0) {
        if (Date.now() > deadline) throw new Error('old raw readings were not removed:\n' + server.log());
        await new Promise((r) => setTimeout(r, 100));
      }
      expect((await db.get<{ n: number }>('SELECT COUNT(*) AS n FROM readings WHERE engine_id = ?', [d.engineId])).n).toBe(1000);
      expect((await db.get<{ n: number }>('SELECT COUNT(*) AS n FROM rollups WHERE engine_id = ?', [d.engineId])).n).toBe(1);
    } finally {
      await db.close();
      expect(await server.stop()).toBe(0);
      fs.rmSync(server.dataDir, { recursive: true, force: true });
    }
  });
});
