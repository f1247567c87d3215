/**
 * Compacted history (server/services/history): raw readings older than COMPACT_AFTER_H packed into hourly
 * blocks, read back exactly as stored through the one read path, on the real database (SQLite or PostgreSQL).
 */
import fs from 'node:fs';
import path from 'node:path';
import mqtt from 'mqtt';
import { QueryTypes, type Sequelize } from 'sequelize';
import { loadConfig } from '../../server/config';
import { createSequelize } from '../../server/db/sequelize';
import { createLogger } from '../../server/logger';
import { startCompactor } from '../../server/services/history/compactor';
import { blockStartOf, readRawRange, type StoredReading } from '../../server/services/history/raw-range';
import { queryBuckets } from '../../server/services/readings-query';
import { ReadingHistory } from '../../server/services/work-orders/reading-history';
import { CHANNELS } from '../../shared/channels';
import { DAY_MS, startRetention } from '../../server/services/retention';
import { telemetryTopic } from '../../shared/topics';
import { makeTestApp, type TestApp } from './helpers';
import { Db, seedFleet, startServerProcess } from './support/telemetry-server';
import { until } from './support/until';
import { spawnInGroup, stopGroup } from './support/process-group';
import { mulberry32 } from '../../simulator/engine-model';
import { engineFields } from './support/engine-fields';

jest.setTimeout(180_000);

const HOUR = 3_600_000;
const NOW = Math.floor(Date.now() / 1000) * 1000;
const CUTOFF = blockStartOf(NOW - 24 * HOUR);
const log = createLogger('error', 'test');
const END = Number.MAX_SAFE_INTEGER;

/** Rows with every number bound (not written as SQL text), so each double is stored exactly. */
async function insertReadings(sequelize: Sequelize, engineId: number, channel: number, rows: StoredReading[]): Promise<void> {
  const int = sequelize.getDialect() === 'postgres' ? 'BIGINT' : 'INTEGER';
  for (let i = 0; i < rows.length; i += 200) {
    const part = rows.slice(i, i + 200);
    const bind: unknown[] = [];
    const values = part.map((r) => {
      bind.push(engineId, channel, r.ts, r.value, r.quality);
      const n = bind.length;
      return `($${n - 4}, $${n - 3}, CAST($${n - 2} AS ${int}), $${n - 1}, $${n})`;
    });
    await sequelize.query(`INSERT INTO readings (engine_id, channel, ts, value, quality) VALUES ${values.join(',')}`, { bind });
  }
}

/** Everything stored for the channel, straight from the raw table (before any compaction). */
async function rawTable(sequelize: Sequelize, engineId: number, channel: number): Promise<StoredReading[]> {
  const rows = await sequelize.query<{ ts: string | number; value: string | number; quality: string | number }>(
    'SELECT ts, value, quality FROM readings WHERE engine_id = $1 AND channel = $2 ORDER BY ts',
    { bind: [engineId, channel], type: QueryTypes.SELECT },
  );
  return rows.map((r) => ({ ts: Number(r.ts), value: Number(r.value), quality: Number(r.quality) }));
}

const count = async (sequelize: Sequelize, sql: string, bind: unknown[] = []) =>
  Number((await sequelize.query<{ n: number | string }>(sql, { bind, type: QueryTypes.SELECT }))[0].n);

/** Same timestamps, same values bit for bit, same qualities. */
function expectSame(actual: StoredReading[], expected: StoredReading[]): void {
  expect(actual.length).toBe(expected.length);
  const hex = (v: number) => Buffer.from(new Float64Array([v]).buffer).toString('hex');
  for (let i = 0; i < expected.length; i++) {
    const a = actual[i];
    const e = expected[i];
    if (a.ts !== e.ts || hex(a.value) !== hex(e.value) || a.quality !== e.quality) {
      throw new Error(`reading ${i}: read ${JSON.stringify(a)}, stored ${JSON.stringify(e)}`);
    }
  }
}

/**
 * Three days of one channel: ~10 s apart with jitter, two gaps (2 h and 30 min), bad-quality readings, values
 * with two decimals (temperature) or any double (a computed channel).
 */
function history(seed: number, anyDouble: boolean): StoredReading[] {
  const r = mulberry32(seed);
  const out: StoredReading[] = [];
  let ts = NOW - 3 * DAY_MS + 1234;
  let v = 60;
  while (ts < NOW - 10 * 60_000) {
    const inGap = (ts > NOW - 50 * HOUR && ts < NOW - 48 * HOUR) || (ts > CUTOFF - 20 * 60_000 && ts < CUTOFF + 10 * 60_000);
    if (!inGap) {
      v += (r() - 0.5) * 0.4;
      const bad = r() < 0.02;
      out.push({ ts, value: bad ? 999.9 : anyDouble ? v * Math.PI : Math.round(v * 100) / 100, quality: bad ? 1 : 0 });
    }
    ts += 10_000 + Math.floor(r() * 400) - 200;
  }
  return out;
}

describe('compacted history in the database', () => {
  let t: TestApp;
  let e1: number;
  let stored1: StoredReading[];
  let stored2: StoredReading[];
  let stopRows: StoredReading[] = [];
  const compactor = () => startCompactor({ sequelize: t.ctx.sequelize, log, config: { compactAfterH: 24 }, now: () => NOW, pauseMs: 0, timer: false });

  beforeAll(async () => {
    t = await makeTestApp({ signIn: false });
    const site = await t.ctx.models.Site.create({ name: 'History site', timeZone: 'UTC' });
    e1 = (await t.ctx.models.Engine.create({ siteId: site.id, name: 'H1', ...engineFields })).id;
    await insertReadings(t.ctx.sequelize, e1, 1, history(1, false));
    await insertReadings(t.ctx.sequelize, e1, 5, history(2, true));
    // a channel that went quiet two days ago: its newest reading stays raw
    await insertReadings(
      t.ctx.sequelize,
      e1,
      3,
      Array.from({ length: 500 }, (_, i) => ({ ts: NOW - 3 * DAY_MS + i * 60_000, value: i % 2 ? 1500 : 0, quality: 0 })),
    );
    // the rollups the writer would have kept
    for (const [table, key, unit] of [
      ['rollups', 'minute', 60_000],
      ['rollups_hourly', 'hour', HOUR],
    ] as const) {
      await t.ctx.sequelize.query(`INSERT INTO ${table} (engine_id, channel, ${key}, "min", "max", "sum", "count", bad_count)
        SELECT engine_id, channel, ts - (ts % ${unit}), MIN(CASE WHEN quality = 0 THEN value END), MAX(CASE WHEN quality = 0 THEN value END),
          COALESCE(SUM(CASE WHEN quality = 0 THEN value END), 0), SUM(CASE WHEN quality = 0 THEN 1 ELSE 0 END), SUM(CASE WHEN quality = 0 THEN 0 ELSE 1 END)
        FROM readings GROUP BY engine_id, channel, ts - (ts % ${unit})`);
    }
    stored1 = await rawTable(t.ctx.sequelize, e1, 1);
    stored2 = await rawTable(t.ctx.sequelize, e1, 5);
  });
  afterAll(() => t.close());

  it('packs whole hours older than a day into blocks and reads back exactly what was stored', async () => {
    const across = { engineId: e1, channel: 'coolant_temp' as const, from: CUTOFF - 3 * HOUR, to: CUTOFF + 3 * HOUR, points: 120 };
    const bucketsBefore = await queryBuckets(t.ctx.sequelize, across);

    const pass = await compactor().pass();
    expect(pass.complete).toBe(true);
    expect(pass.cutoff).toBe(CUTOFF);
    expect(pass.duplicates).toBe(0);
    expect(await count(t.ctx.sequelize, 'SELECT COUNT(*) AS n FROM readings WHERE engine_id = $1 AND channel IN (1, 5) AND ts < $2', [e1, CUTOFF])).toBe(0);
    const blocks = await t.ctx.sequelize.query<{ block_start: string | number; first_ts: string | number; last_ts: string | number; count: string | number }>(
      'SELECT block_start, first_ts, last_ts, "count" FROM reading_blocks WHERE engine_id = $1 AND channel = 1 ORDER BY block_start',
      { bind: [e1], type: QueryTypes.SELECT },
    );
    // one block per hour before the cutoff that has readings (the 2-hour gap has none)
    const hours = new Set(stored1.filter((r) => r.ts < CUTOFF).map((r) => blockStartOf(r.ts)));
    expect(hours.size).toBeLessThan(48);
    expect(blocks.map((b) => Number(b.block_start))).toEqual([...hours]);
    for (const b of blocks) {
      expect(Number(b.first_ts)).toBeGreaterThanOrEqual(Number(b.block_start));
      expect(Number(b.last_ts)).toBeLessThan(Number(b.block_start) + HOUR);
    }
    expect(blocks.reduce((n, b) => n + Number(b.count), 0)).toBe(stored1.filter((r) => r.ts < CUTOFF).length);

    // the whole history, and a range across the boundary of compacted and recent data
    expectSame(await readRawRange(t.ctx.sequelize, e1, 1, 0, END), stored1);
    expectSame(await readRawRange(t.ctx.sequelize, e1, 5, 0, END), stored2);
    const from = CUTOFF - 90 * 60_000 + 17;
    const to = CUTOFF + 2 * HOUR + 3;
    expectSame(
      await readRawRange(t.ctx.sequelize, e1, 1, from, to),
      stored1.filter((r) => r.ts >= from && r.ts < to),
    );
    // pages of a limited read join up to the whole
    const paged: StoredReading[] = [];
    for (let after = -1; ;) {
      const page = await readRawRange(t.ctx.sequelize, e1, 5, after + 1, END, { limit: 1000 });
      paged.push(...page);
      if (page.length < 1000) break;
      after = page[page.length - 1].ts;
    }
    expectSame(paged, stored2);
    expectSame(
      await readRawRange(t.ctx.sequelize, e1, 1, 0, END, { goodOnly: true }),
      stored1.filter((r) => r.quality === 0),
    );

    // the trend's raw buckets across the boundary are the same as before
    const after = await queryBuckets(t.ctx.sequelize, across);
    expect(after.source).toBe('raw');
    expect(after.buckets.map((b) => [b.t, b.min, b.max, b.count])).toEqual(bucketsBefore.buckets.map((b) => [b.t, b.min, b.max, b.count]));
    after.buckets.forEach((b, i) => expect(b.mean).toBeCloseTo(bucketsBefore.buckets[i].mean, 9));

    // a second pass finds nothing left to do
    expect((await compactor().pass()).blocks).toBe(0);
  });

  it('keeps the newest reading of a channel raw, so the live state finds it at start', async () => {
    expect(await count(t.ctx.sequelize, 'SELECT COUNT(*) AS n FROM readings WHERE engine_id = $1 AND channel = 3', [e1])).toBe(1);
    const all = await readRawRange(t.ctx.sequelize, e1, 3, 0, END);
    expect(all.length).toBe(500);
    expect(all[499].ts).toBe(NOW - 3 * DAY_MS + 499 * 60_000);
  });

  it("the opening check's stop record reads the same from compacted history", async () => {
    const site = await t.ctx.models.Site.create({ name: 'Stop site', timeZone: 'UTC' });
    const e = (await t.ctx.models.Engine.create({ siteId: site.id, name: 'S1', ...engineFields })).id;
    const speed = CHANNELS.engine_speed.code;
    // ran until 70 hours ago, stopped since (a reading every 10 s)
    const ranUntil = NOW - 70 * HOUR;
    const rows = Array.from({ length: (72 * HOUR - 2 * HOUR) / 10_000 }, (_, i) => {
      const ts = NOW - 72 * HOUR + i * 10_000;
      return { ts, value: ts < ranUntil ? 1500 : 0, quality: 0 };
    });
    await insertReadings(t.ctx.sequelize, e, speed, rows);
    stopRows = rows;
    await t.ctx.sequelize.query(`INSERT INTO rollups (engine_id, channel, minute, "min", "max", "sum", "count", bad_count)
      SELECT engine_id, channel, ts - (ts % 60000), MIN(value), MAX(value), SUM(value), COUNT(*), 0 FROM readings WHERE engine_id = ${e} GROUP BY engine_id, channel, ts - (ts % 60000)`);
    const expected = { lastRunTs: ranUntil - 10_000, stoppedSinceTs: ranUntil };
    expect(await new ReadingHistory(t.ctx.sequelize).stopRecord(e, NOW)).toEqual(expected);
    await compactor().pass();
    expect(await count(t.ctx.sequelize, 'SELECT COUNT(*) AS n FROM readings WHERE engine_id = $1 AND ts < $2', [e, CUTOFF])).toBe(0);
    expect(await new ReadingHistory(t.ctx.sequelize).stopRecord(e, NOW)).toEqual(expected);
  });

  it('merges late and out-of-order arrivals into their blocks, and stores a redelivered reading once', async () => {
    const inBlock = stored1.find((r) => r.ts > NOW - 40 * HOUR)!;
    const late: StoredReading[] = [
      { ts: NOW - 30 * HOUR + 1, value: 71.25, quality: 0 },
      { ts: NOW - 70 * HOUR + 5, value: 998, quality: 1 },
      { ts: inBlock.ts + 1, value: 70.5, quality: 0 },
      { ts: NOW - 49 * HOUR, value: 66.6, quality: 0 }, // inside the gap: a new block
    ];
    // a redelivery of a compacted reading with another value (the stored one must stay), counted in the rollups
    // by the writer as a new reading, as it does when the raw row it would conflict with is gone
    const redelivered = { ts: inBlock.ts, value: inBlock.value + 1, quality: 0 };
    const minute = inBlock.ts - (inBlock.ts % 60_000);
    const hour = inBlock.ts - (inBlock.ts % HOUR);
    const rollup = async () =>
      t.ctx.sequelize.query<{ n: number | string; s: number | string }>(
        `SELECT (SELECT "count" FROM rollups WHERE engine_id = $1 AND channel = 1 AND minute = $2) AS n,
          (SELECT "sum" FROM rollups_hourly WHERE engine_id = $1 AND channel = 1 AND hour = $3) AS s`,
        { bind: [e1, minute, hour], type: QueryTypes.SELECT },
      );
    const [before] = await rollup();
    await insertReadings(t.ctx.sequelize, e1, 1, [redelivered, ...late.reverse()]);
    await t.ctx.sequelize.query(`UPDATE rollups SET "count" = "count" + 1, "sum" = "sum" + $3 WHERE engine_id = $1 AND channel = 1 AND minute = $2`, {
      bind: [e1, minute, redelivered.value],
    });
    await t.ctx.sequelize.query(`UPDATE rollups_hourly SET "count" = "count" + 1, "sum" = "sum" + $3 WHERE engine_id = $1 AND channel = 1 AND hour = $2`, {
      bind: [e1, hour, redelivered.value],
    });
    const expected = [...stored1, ...late].sort((a, b) => a.ts - b.ts);
    expect(new Set(expected.map((r) => r.ts)).size).toBe(expected.length);

    // before the next pass: the late readings are read from raw, the redelivery not (the block's reading was first)
    expectSame(await readRawRange(t.ctx.sequelize, e1, 1, 0, END), expected);

    const pass = await compactor().pass();
    expect(pass.duplicates).toBe(1);
    expect(await count(t.ctx.sequelize, 'SELECT COUNT(*) AS n FROM readings WHERE engine_id = $1 AND channel = 1 AND ts < $2', [e1, CUTOFF])).toBe(0);
    expectSame(await readRawRange(t.ctx.sequelize, e1, 1, 0, END), expected);
    // the rollups no longer count the redelivery
    const [after] = await rollup();
    expect(Number(after.n)).toBe(Number(before.n));
    expect(Number(after.s)).toBeCloseTo(Number(before.s), 6);
    stored1 = expected;
  });

  it('retention removes compacted readings older than RAW_RETENTION_DAYS, to the millisecond', async () => {
    const keptFrom = NOW - 2 * DAY_MS;
    const retention = startRetention({
      sequelize: t.ctx.sequelize,
      log,
      now: () => NOW,
      timer: false,
      config: { rawRetentionDays: 2, retentionBatch: 1000, retentionPauseMs: 0, retentionEveryMs: 3600_000 },
    });
    const result = await retention.sweep();
    await retention.stop();
    expect(result.complete).toBe(true);
    expect(result.deletedCompacted).toBe(
      stored1.filter((r) => r.ts < keptFrom).length + stored2.filter((r) => r.ts < keptFrom).length + stopRows.filter((r) => r.ts < keptFrom).length + 500 - 1,
    );
    expectSame(
      await readRawRange(t.ctx.sequelize, e1, 1, 0, END),
      stored1.filter((r) => r.ts >= keptFrom),
    );
    expectSame(
      await readRawRange(t.ctx.sequelize, e1, 5, 0, END),
      stored2.filter((r) => r.ts >= keptFrom),
    );
    expect(await count(t.ctx.sequelize, 'SELECT COUNT(*) AS n FROM reading_blocks WHERE first_ts < $1', [keptFrom])).toBe(0);
  });
});

describe('compaction while a server ingests over MQTT', () => {
  it('loses and doubles nothing: live readings, late ones and redeliveries of compacted readings', async () => {
    const server = await startServerProcess({ env: { COMPACT_AFTER_H: '0' } });
    const db = new Db(server.databaseUrl);
    // the compactor runs here, on its own connection to the server's database, as a second writer
    const sequelize = createSequelize(loadConfig({ DATA_DIR: server.dataDir, DATABASE_URL: server.databaseUrl, LOG_LEVEL: 'error' }), log);
    const client: mqtt.MqttClient[] = [];
    try {
      const fleet = await seedFleet(db, 2, 'hist');
      const old: StoredReading[] = Array.from({ length: 2 * 24 * 360 }, (_, i) => ({
        ts: NOW - 3 * DAY_MS + i * 10_000,
        value: Math.round(Math.sin(i / 50) * 1000) / 100 + 70,
        quality: i % 101 === 0 ? 1 : 0,
      }));
      for (const d of fleet) await insertReadings(sequelize, d.engineId, 1, old);
      const compactor = startCompactor({ sequelize, log, config: { compactAfterH: 24 }, pauseMs: 0, timer: false });

      // live readings of both engines (QoS 1) while the compactor packs their history
      const live = 300;
      const start = Date.now() - live * 1000;
      const publish = async (d: (typeof fleet)[number]) => {
        const c = await mqtt.connectAsync(`mqtt://127.0.0.1:${server.mqttPort}`, { username: d.username, password: d.secret, reconnectPeriod: 0 });
        client.push(c);
        for (let i = 0; i < live; i += 50) {
          const samples = Array.from({ length: 50 }, (_, k) => ({
            ts: new Date(start + (i + k) * 1000).toISOString(),
            values: { coolant_temp: 80 + ((i + k) % 7) / 4, coolant_pressure: 90 },
          }));
          await c.publishAsync(telemetryTopic(d.engineId), JSON.stringify({ samples }), { qos: 1 });
        }
        return c;
      };
      const [pass, c0] = await Promise.all([compactor.pass(), publish(fleet[0]), publish(fleet[1])]);
      expect(pass.complete).toBe(true);
      expect(pass.readings).toBeGreaterThan(0);

      // a gateway replays part of its buffer from two days ago: compacted readings again, and one it never sent
      const d0 = fleet[0];
      const replay = old.slice(2000, 2100).filter((r) => r.quality === 0);
      const missing = { ts: replay[10].ts + 5000, value: 12.5, quality: 0 };
      const samples = [...replay, missing].map((r) => ({ ts: new Date(r.ts).toISOString(), values: { coolant_temp: r.value } }));
      await c0.publishAsync(telemetryTopic(d0.engineId), JSON.stringify({ samples }), { qos: 1 });
      await until(
        'the replayed readings stored',
        () => db.get<{ n: number }>('SELECT COUNT(*) AS n FROM readings WHERE engine_id = ? AND channel = 1 AND ts < ?', [d0.engineId, CUTOFF]),
        (r) => Number(r.n) === replay.length + 1,
        30_000,
      );
      const second = await compactor.pass();
      expect(second.duplicates).toBe(replay.length);
      await compactor.stop();

      for (const d of fleet) {
        const expectOld = d === d0 ? [...old, missing].sort((a, b) => a.ts - b.ts) : old;
        const all = await readRawRange(sequelize, d.engineId, 1, 0, END);
        expectSame(
          all.filter((r) => r.ts < NOW - DAY_MS),
          expectOld,
        );
        // every live reading, once
        expect(all.filter((r) => r.ts >= start).length).toBe(live);
        expect((await readRawRange(sequelize, d.engineId, 2, start, END)).length).toBe(live);
      }
      expect(await db.all('SELECT engine_id, channel, ts FROM readings GROUP BY engine_id, channel, ts HAVING COUNT(*) > 1')).toEqual([]);
    } finally {
      for (const c of client) await c.endAsync();
      await sequelize.close();
      await db.close();
      expect(await server.stop()).toBe(0);
      fs.rmSync(server.dataDir, { recursive: true, force: true });
    }
  });
});

describe('a compactor killed with SIGKILL part-way', () => {
  it('loses nothing: each block is one transaction, and the next pass finishes the job', async () => {
    const t = await makeTestApp({ signIn: false });
    let child: ReturnType<typeof spawnInGroup> | null = null;
    try {
      const site = await t.ctx.models.Site.create({ name: 'Kill site', timeZone: 'UTC' });
      const e = (await t.ctx.models.Engine.create({ siteId: site.id, name: 'K1', ...engineFields })).id;
      await insertReadings(t.ctx.sequelize, e, 1, history(3, false));
      await insertReadings(t.ctx.sequelize, e, 2, history(4, true));
      const stored = [await rawTable(t.ctx.sequelize, e, 1), await rawTable(t.ctx.sequelize, e, 2)];
      const root = path.resolve(__dirname, '../..');
      child = spawnInGroup(process.execPath, [path.join(root, 'node_modules/tsx/dist/cli.mjs'), path.join(__dirname, 'support/compact-child.ts')], {
        cwd: root,
        env: { ...process.env, DATA_DIR: t.dataDir, DATABASE_URL: t.ctx.config.databaseUrl, COMPACT_NOW: String(NOW), COMPACT_PAUSE_MS: '300' },
        stdio: ['ignore', 'pipe', 'inherit'],
      });
      let out = '';
      child.stdout!.on('data', (d) => (out += d));
      // kill it once it has written a few blocks (steps are 300 ms apart, a pass has about a hundred)
      await until(
        'some blocks written',
        () => count(t.ctx.sequelize, 'SELECT COUNT(*) AS n FROM reading_blocks'),
        (n) => n >= 3,
        60_000,
        20,
      );
      process.kill(-child.pid!, 'SIGKILL');
      await stopGroup(child);
      expect(out).not.toContain('done');
      const blocksAfterKill = await count(t.ctx.sequelize, 'SELECT COUNT(*) AS n FROM reading_blocks');
      expect(blocksAfterKill).toBeLessThan(90);
      // part raw, part compacted: every reading there, once
      expectSame(await readRawRange(t.ctx.sequelize, e, 1, 0, END), stored[0]);
      expectSame(await readRawRange(t.ctx.sequelize, e, 2, 0, END), stored[1]);
      const pass = await startCompactor({ sequelize: t.ctx.sequelize, log, config: { compactAfterH: 24 }, now: () => NOW, pauseMs: 0, timer: false }).pass();
      expect(pass.complete).toBe(true);
      expect(pass.duplicates).toBe(0);
      expect(await count(t.ctx.sequelize, 'SELECT COUNT(*) AS n FROM readings WHERE ts < $1', [CUTOFF])).toBe(0);
      expectSame(await readRawRange(t.ctx.sequelize, e, 1, 0, END), stored[0]);
      expectSame(await readRawRange(t.ctx.sequelize, e, 2, 0, END), stored[1]);
    } finally {
      await stopGroup(child);
      await t.close();
    }
  });
});
