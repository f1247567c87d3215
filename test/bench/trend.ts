/**
 * Bench phase: long trends against short ones. A DATA_DIR with BENCH_TREND_ENGINES (200) engines and
 * BENCH_TREND_DAYS (30) days of coolant-temperature history (per-minute and per-hour rollups as the writer
 * keeps them, raw readings at 1 Hz for the last hour), written straight into the file with the server
 * stopped; then the server answers GET /api/engines/:id/readings for the 30-day window and the 1-hour window
 * at chart width (1,000 points), several times each on different engines. Medians: trend30dMs, trend1hMs.
 * Only the charted channel is written (the other four would only add rows the queries never read).
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import bcrypt from 'bcryptjs';
import { loadJwtSecret } from '../../server/auth/jwt-secret';
import { createTokenService } from '../../server/auth/tokens';
import { Db, seedFleet, startServerProcess } from '../server/support/telemetry-server';

const ENGINES = Number(process.env.BENCH_TREND_ENGINES ?? 200);
const DAYS = Number(process.env.BENCH_TREND_DAYS ?? 30);
const REQUESTS = 9;
const POINTS = 1000;
const MINUTE = 60_000;
const HOUR = 3_600_000;

export interface TrendFigures {
  engines: number;
  days: number;
  minuteRows: number;
  hourRows: number;
  rawRows: number;
  seedS: number;
  trend30dMs: number;
  trend1hMs: number;
  trend30dRuns: number[];
  trend1hRuns: number[];
  source30d: string;
  /** The same 30 days at 2,000 points: 22-minute buckets, so from the per-minute rollups (the path every 30-day chart took before 0020). */
  trend30dMinutesMs: number;
}

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

export async function trendPhase(progress: (m: string) => void): Promise<TrendFigures> {
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'jw-bench-trend-'));
  try {
    let server = await startServerProcess({ dataDir, group: true });
    const ports = server.ports;
    let db = new Db(server.databaseUrl);
    const fleet = await seedFleet(db, ENGINES, 'trend');
    const adminId = await db.run(`INSERT INTO users (email, name, password_hash, role, disabled, created_at, updated_at) VALUES (?, ?, ?, 'admin', 0, ?, ?)`, [
      'bench-trend@example.test',
      'Bench admin',
      bcrypt.hashSync(`bench-${Date.now()}`, 4),
      new Date().toISOString(),
      new Date().toISOString(),
    ]);
    await db.close();
    await server.stop();

    // history written in SQL (recursive series), one transaction per engine
    const now = Date.now();
    const end = Math.floor(now / MINUTE) * MINUTE;
    const start = end - DAYS * 24 * 60 * MINUTE;
    const t0 = performance.now();
    db = new Db(server.databaseUrl);
    await db.exec('PRAGMA journal_mode=WAL; PRAGMA synchronous=NORMAL; PRAGMA cache_size=-65536');
    for (const d of fleet) {
      await db.exec('BEGIN');
      // a daily ramp of a few kelvin around 81 °C; 60 good readings a minute
      await db.run(
        `WITH RECURSIVE m(i) AS (SELECT 0 UNION ALL SELECT i + 1 FROM m WHERE i < ?)
        INSERT INTO rollups (engine_id, channel, minute, "min", "max", "sum", "count", bad_count)
        SELECT ?, 1, ? + i * 60000, v - 0.3, v + 0.3, 60 * v, 60, 0 FROM (SELECT i, 81 + ((i % 1440) - 720) / 360.0 AS v FROM m)`,
        [DAYS * 24 * 60 - 1, d.engineId, start],
      );
      await db.run(
        `INSERT INTO rollups_hourly (engine_id, channel, hour, "min", "max", "sum", "count", bad_count)
        SELECT engine_id, channel, minute - (minute % 3600000), MIN("min"), MAX("max"), SUM("sum"), SUM("count"), SUM(bad_count)
        FROM rollups WHERE engine_id = ? AND channel = 1 GROUP BY engine_id, channel, minute - (minute % 3600000)`,
        [d.engineId],
      );
      await db.run(
        `WITH RECURSIVE s(i) AS (SELECT 0 UNION ALL SELECT i + 1 FROM s WHERE i < 3599)
        INSERT INTO readings (engine_id, channel, ts, value, quality) SELECT ?, 1, ? + i * 1000, 81 + ((i % 60) - 30) / 100.0, 0 FROM s`,
        [d.engineId, now - HOUR],
      );
      await db.exec('COMMIT');
    }
    const count = async (table: string) => Number((await db.get<{ n: number }>(`SELECT COUNT(*) AS n FROM ${table}`)).n);
    const [minuteRows, hourRows, rawRows] = [await count('rollups'), await count('rollups_hourly'), await count('readings')];
    await db.close();
    const seedS = (performance.now() - t0) / 1000;
    progress(`trend: ${ENGINES} engines x ${DAYS} days written (${minuteRows.toLocaleString('en-US')} minute rows) in ${seedS.toFixed(0)} s; server restarts`);

    server = await startServerProcess({ dataDir, ports, group: true });
    try {
      const token = createTokenService(loadJwtSecret(dataDir)).sign({ id: adminId, email: 'bench-trend@example.test', role: 'admin' });
      const time = async (engineId: number, from: number, to: number, points = POINTS): Promise<{ ms: number; source: string }> => {
        const t = performance.now();
        const res = await fetch(`${server.url}/api/engines/${engineId}/readings?channel=coolant_temp&from=${from}&to=${to}&points=${points}`, {
          headers: { authorization: `Bearer ${token}` },
        });
        const body = (await res.json()) as { buckets: unknown[]; source: string; rollupPeriod?: string | null };
        const ms = performance.now() - t;
        if (!res.ok || body.buckets.length === 0) throw new Error(`trend request answered ${res.status} with ${body.buckets?.length} buckets`);
        return { ms, source: `${body.source}${body.rollupPeriod ? `/${body.rollupPeriod}` : ''} (${body.buckets.length} buckets)` };
      };
      await time(fleet[0].engineId, now - DAYS * 24 * HOUR, now); // warm the route once
      const runs30: number[] = [];
      const runs1h: number[] = [];
      const runs30m: number[] = [];
      let source30d = '';
      for (let i = 0; i < REQUESTS; i++) {
        const engineId = fleet[(i * 37 + 11) % fleet.length].engineId;
        const long = await time(engineId, now - DAYS * 24 * HOUR, now);
        runs30.push(long.ms);
        source30d = long.source;
        runs1h.push((await time(engineId, now - HOUR, now)).ms);
        runs30m.push((await time(engineId, now - DAYS * 24 * HOUR, now, 2000)).ms);
      }
      return {
        engines: ENGINES,
        days: DAYS,
        minuteRows,
        hourRows,
        rawRows,
        seedS,
        trend30dMs: median(runs30),
        trend1hMs: median(runs1h),
        trend30dRuns: runs30,
        trend1hRuns: runs1h,
        source30d,
        trend30dMinutesMs: median(runs30m),
      };
    } finally {
      await server.stop();
    }
  } finally {
    fs.rmSync(dataDir, { recursive: true, force: true });
  }
}

export function printTrend(r: TrendFigures): void {
  const line = (k: string, v: string) => console.log(`  ${k.padEnd(46)} ${v}`);
  console.log(
    `\n6. Long trends (${r.engines} engines x ${r.days} days of coolant temperature; ${POINTS}-point chart; median of ${REQUESTS} requests, each on another engine)`,
  );
  line(
    'history in the file (minute / hour / raw rows)',
    `${r.minuteRows.toLocaleString('en-US')} / ${r.hourRows.toLocaleString('en-US')} / ${r.rawRows.toLocaleString('en-US')} (written in ${r.seedS.toFixed(0)} s)`,
  );
  line(`${r.days}-day trend (trend30dMs)`, `${r.trend30dMs.toFixed(1)} ms from ${r.source30d}`);
  line('1-hour trend (trend1hMs)', `${r.trend1hMs.toFixed(1)} ms from raw readings`);
  line('ratio 30-day / 1-hour', `${(r.trend30dMs / r.trend1hMs).toFixed(2)}   (goal <= 2)`);
  line(`${r.days} days from per-minute rollups (2,000 points)`, `${r.trend30dMinutesMs.toFixed(1)} ms (the path before per-hour rollups)`);
}
