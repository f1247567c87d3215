/**
 * Bench helper (its own process, run before the server starts): the raw node-sqlite3 ceiling for the
 * readings table. Same schema and the same UNIQUE (engine_id, channel, ts) index as the server, WAL +
 * synchronous=NORMAL, the writer's insert (500-row statements prepared once, ON CONFLICT DO NOTHING,
 * one transaction per 10,000 rows), no rollups, no MQTT. Prints one JSON line { rate, rows }.
 * Env: RAW_ROWS (rows to write), RAW_MAX_MS (time bound), RAW_ENGINES.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Db } from '../server/support/telemetry-server';

const ROWS = Number(process.env.RAW_ROWS ?? 300_000);
const MAX_MS = Number(process.env.RAW_MAX_MS ?? 10_000);
const ENGINES = Number(process.env.RAW_ENGINES ?? 100);

async function main(): Promise<void> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'jw-bench-raw-'));
  const db = new Db(path.join(dir, 'raw.sqlite'));
  await db.exec(`PRAGMA journal_mode=WAL; PRAGMA synchronous=NORMAL; PRAGMA cache_size=-32768;
    CREATE TABLE readings (engine_id INTEGER NOT NULL, channel INTEGER NOT NULL, ts BIGINT NOT NULL, value DOUBLE PRECISION NOT NULL, quality INTEGER NOT NULL DEFAULT 0);
    CREATE UNIQUE INDEX readings_engine_channel_ts ON readings (engine_id, channel, ts);`);
  const per = 500;
  const sql = `INSERT INTO readings (engine_id, channel, ts, value, quality) VALUES ${Array(per).fill('(?,?,?,?,?)').join(',')} ON CONFLICT (engine_id, channel, ts) DO NOTHING`;
  const base = Date.now() - 20 * 86_400_000;
  const params: number[] = [];
  let engine = 1;
  let ts = base;
  const started = performance.now();
  let done = 0;
  while (done < ROWS && performance.now() - started < MAX_MS) {
    await db.exec('BEGIN');
    for (let s = 0; s < 10_000 / per && done < ROWS; s++) {
      params.length = 0;
      for (let i = 0; i < per / 5; i++) {
        for (let ch = 1; ch <= 5; ch++) params.push(engine, ch, ts, 80 + Math.sin(ts / 1000), 0);
        engine = (engine % ENGINES) + 1;
        if (engine === 1) ts += 1000;
      }
      await db.runPrepared(sql, params);
      done += per;
    }
    await db.exec('COMMIT');
  }
  const rate = done / ((performance.now() - started) / 1000);
  await db.close();
  fs.rmSync(dir, { recursive: true, force: true });
  process.stdout.write(JSON.stringify({ rate, rows: done }) + '\n');
}

main().catch((err) => {
  process.stderr.write(String(err?.stack ?? err) + '\n');
  process.exit(1);
});
