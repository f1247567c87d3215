/**
 * Bench phase: bytes on disk per stored reading, raw and compacted (`BENCH_PHASE=history`, also part of the full bench).
 * A migrated SQLite DATA_DIR gets one day of 1 Hz history of BENCH_HISTORY_ENGINES (4) engines x 5 channels,
 * values from the simulator's engine model (simulator/engine-model.ts: two running, the others standby) and
 * timestamps one second apart plus the 0-11 ms of timer lateness a live gateway has, the day ending 25 hours
 * ago; the compactor (COMPACT_AFTER_H=24) then packs it, and the same history is read back and compared.
 *
 * What is counted: the pages SQLite's `dbstat` table gives to `readings`, its unique (engine_id, channel, ts)
 * index, `reading_blocks` and its primary-key index, divided by the readings stored. Not counted: the
 * rollups (kept as before, the same with or without compaction), other tables, free pages left in the file
 * by the deleted raw rows (SQLite reuses them for the next rows; `VACUUM` returns them: the file size after one
 * is printed too). With JW_TEST_PG_URL set (scripts/with-postgres.ts) the same on PostgreSQL, counted with
 * pg_total_relation_size (tables, indexes, TOAST) after a plain VACUUM.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { QueryTypes, type Sequelize } from 'sequelize';
import { loadConfig } from '../../server/config';
import { createSequelize } from '../../server/db/sequelize';
import { createLogger } from '../../server/logger';
import { startCompactor } from '../../server/services/history/compactor';
import { readRawRange } from '../../server/services/history/raw-range';
import { CHANNELS, CHANNEL_KEYS } from '../../shared/channels';
import { EngineModel } from '../../simulator/engine-model';
import { Db, seedFleet, startServerProcess } from '../server/support/telemetry-server';
import { mulberry32 } from '../../simulator/engine-model';

const ENGINES = Number(process.env.BENCH_HISTORY_ENGINES ?? 4);
const SECONDS = 86_400;
const HOUR = 3_600_000;

export interface HistoryFigures {
  dialect: 'sqlite' | 'postgres';
  engines: number;
  readings: number;
  seedS: number;
  /** Before compaction: readings table + its index, bytes per reading. */
  rawBytesPerReading: number;
  /** PostgreSQL: after a plain VACUUM, pages still held by the table files (free for later rows), bytes per reading. */
  pgHeldBytesPerReading: number;
  /** After: readings + index + reading_blocks + its index, bytes per reading (pages in use). */
  bytesPerReading: number;
  /** Bytes of the packed data alone (the codec's output) per reading. */
  blockDataBytesPerReading: number;
  blocks: number;
  rawRowsLeft: number;
  compactS: number;
  /** Readings read back through the merged path equal to those written (timestamps, values bit for bit, quality), in order. */
  lossless: boolean;
  fileBytesBefore: number;
  fileBytesAfterVacuum: number;
  tables: Record<string, number>;
}

/**
 * SQLite: bytes dbstat gives each table and index (pages in use, whole pages). PostgreSQL: pg_total_relation_size
 * (table, indexes and TOAST) of every partition of `readings`, and of `reading_blocks`, after a plain VACUUM
 * (`full`: VACUUM FULL, which gives back the pages the deleted raw rows held, as dbstat leaves free pages out).
 */
async function pageBytes(sequelize: Sequelize, full = false): Promise<Record<string, number>> {
  if (sequelize.getDialect() === 'postgres') {
    await sequelize.query(`VACUUM${full ? ' FULL' : ''} readings, reading_blocks`, { logging: false });
    const [row] = await sequelize.query<{ readings: string; blocks: string }>(
      `SELECT (SELECT SUM(pg_total_relation_size(relid)) FROM pg_partition_tree('readings')) AS readings, pg_total_relation_size('reading_blocks') AS blocks`,
      { type: QueryTypes.SELECT, logging: false },
    );
    return { readings: Number(row.readings), reading_blocks: Number(row.blocks) };
  }
  const rows = await sequelize.query<{ name: string; bytes: number }>(
    `SELECT name, SUM(pgsize) AS bytes FROM dbstat WHERE name IN (SELECT name FROM sqlite_master WHERE tbl_name IN ('readings', 'reading_blocks')) GROUP BY name`,
    { type: QueryTypes.SELECT, logging: false },
  );
  return Object.fromEntries(rows.map((r) => [r.name, Number(r.bytes)]));
}
const sum = (o: Record<string, number>) => Object.values(o).reduce((a, b) => a + b, 0);

export async function historyPhase(progress: (m: string) => void): Promise<HistoryFigures> {
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'jw-bench-history-'));
  const log = createLogger('error', 'bench');
  try {
    // a migrated file with the engines, then the server stops
    const server = await startServerProcess({ dataDir, group: true, env: { COMPACT_AFTER_H: '0' } });
    const dbUrl = server.databaseUrl;
    const postgres = /^postgres/.test(dbUrl);
    let db = new Db(dbUrl);
    const fleet = await seedFleet(db, ENGINES, 'hist');
    await db.close();
    await server.stop();

    // one day of 1 Hz history ending 25 hours ago, written with bound numbers (each double stored exactly)
    const now = Date.now();
    const start = Math.floor((now - 49 * HOUR) / 1000) * 1000;
    const t0 = performance.now();
    db = new Db(dbUrl);
    if (!postgres) await db.exec('PRAGMA journal_mode=WAL; PRAGMA synchronous=NORMAL; PRAGMA cache_size=-65536');
    const keys = CHANNEL_KEYS;
    const perStmt = 100;
    const sql = `INSERT INTO readings (engine_id, channel, ts, value, quality) VALUES ${Array.from({ length: perStmt }, () => '(?,?,?,?,?)').join(',')}`;
    let readings = 0;
    // what is written, kept to compare with what is read back after compaction
    const written = new Map<string, { ts: number[]; value: number[] }>();
    for (const [n, d] of fleet.entries()) {
      const model = new EngineModel(
        { engineId: d.engineId, duty: n < 2 ? 'prime' : 'standby', capacityL: 60, capPressureKpa: 100, heaterSetpointC: 40 },
        { seed: 100 + n, startMs: start - 1000 },
      );
      if (n < 2) model.setCommand('run');
      const late = mulberry32(7 + n);
      let params: number[] = [];
      await db.exec('BEGIN');
      for (let i = 0; i < SECONDS; i++) {
        const ts = start + i * 1000 + Math.floor(late() ** 3 * 12);
        const { values } = model.step(ts).sample;
        for (const k of keys) {
          const v = values[k];
          if (v === undefined) continue;
          params.push(d.engineId, CHANNELS[k].code, ts, v, 0);
          const w = written.get(`${d.engineId}:${CHANNELS[k].code}`) ?? { ts: [], value: [] };
          if (!w.ts.length) written.set(`${d.engineId}:${CHANNELS[k].code}`, w);
          w.ts.push(ts);
          w.value.push(v);
          readings++;
          if (params.length === perStmt * 5) {
            await db.runPrepared(sql, params);
            params = [];
          }
        }
        if (i % 20_000 === 19_999) {
          await db.exec('COMMIT');
          await db.exec('BEGIN');
        }
      }
      for (let j = 0; j < params.length; j += 5)
        await db.run('INSERT INTO readings (engine_id, channel, ts, value, quality) VALUES (?,?,?,?,?)', params.slice(j, j + 5));
      await db.exec('COMMIT');
      progress(`history: engine ${n + 1} of ${fleet.length} written`);
    }
    await db.close();
    const seedS = (performance.now() - t0) / 1000;
    const fileSize = () => (postgres ? NaN : fs.statSync(dbUrl.replace(/^sqlite:(\/\/)?/, '')).size);
    const fileBytesBefore = fileSize();

    const sequelize = createSequelize(loadConfig({ DATA_DIR: dataDir, DATABASE_URL: dbUrl, LOG_LEVEL: 'error' }), log);
    try {
      const before = await pageBytes(sequelize);
      progress(`history: ${readings.toLocaleString('en-US')} readings written in ${seedS.toFixed(0)} s; compacting`);

      const t1 = performance.now();
      const pass = await startCompactor({ sequelize, log, config: { compactAfterH: 24 }, pauseMs: 0, timer: false }).pass();
      const compactS = (performance.now() - t1) / 1000;
      if (!pass.complete) throw new Error('compaction pass did not complete');

      let lossless = true;
      for (const [key, w] of written) {
        const [engineId, code] = key.split(':').map(Number);
        const a = await readRawRange(sequelize, engineId, code, 0, Number.MAX_SAFE_INTEGER);
        if (a.length !== w.ts.length || a.some((r, i) => r.ts !== w.ts[i] || !Object.is(r.value, w.value[i]) || r.quality !== 0)) lossless = false;
      }
      // PostgreSQL keeps the deleted rows' pages in the table (reused by later inserts): held after a plain VACUUM,
      // in use after VACUUM FULL (what dbstat counts on SQLite)
      const held = postgres ? sum(await pageBytes(sequelize)) / readings : NaN;
      const after = await pageBytes(sequelize, true);
      const [{ n: blocks, bytes: dataBytes }] = await sequelize.query<{ n: number; bytes: number }>(
        'SELECT COUNT(*) AS n, SUM(LENGTH(data)) AS bytes FROM reading_blocks',
        { type: QueryTypes.SELECT },
      );
      const [{ n: rawRowsLeft }] = await sequelize.query<{ n: number }>('SELECT COUNT(*) AS n FROM readings', { type: QueryTypes.SELECT });
      if (!postgres) await sequelize.query('VACUUM');
      const fileBytesAfterVacuum = fileSize();
      return {
        dialect: postgres ? 'postgres' : 'sqlite',
        engines: fleet.length,
        readings,
        seedS,
        rawBytesPerReading: sum(before) / readings,
        pgHeldBytesPerReading: held,
        bytesPerReading: sum(after) / readings,
        blockDataBytesPerReading: Number(dataBytes) / readings,
        blocks: Number(blocks),
        rawRowsLeft: Number(rawRowsLeft),
        compactS,
        lossless,
        fileBytesBefore,
        fileBytesAfterVacuum,
        tables: after,
      };
    } finally {
      await sequelize.close();
    }
  } finally {
    fs.rmSync(dataDir, { recursive: true, force: true });
  }
}

export function printHistory(h: HistoryFigures): void {
  const line = (k: string, v: string) => console.log(`  ${k.padEnd(46)} ${v}`);
  const mb = (b: number) => `${(b / 1e6).toFixed(1)} MB`;
  console.log(
    `\n8. Compacted history (${h.engines} engines x 5 channels x 1 Hz, one day = ${h.readings.toLocaleString('en-US')} readings, simulator values; ${
      h.dialect === 'postgres'
        ? 'PostgreSQL pg_total_relation_size of the readings partitions and reading_blocks with indexes and TOAST, after VACUUM FULL'
        : 'SQLite dbstat pages of readings + its index + reading_blocks + its index'
    })`,
  );
  line('raw, before compaction (rawBytesPerReading)', `${h.rawBytesPerReading.toFixed(1)} bytes/reading`);
  line('compacted (bytesPerReading)', `${h.bytesPerReading.toFixed(2)} bytes/reading   (goal: at most 12)`);
  if (h.dialect === 'postgres') line('held after a plain VACUUM (free space kept for new rows)', `${h.pgHeldBytesPerReading.toFixed(1)} bytes/reading`);
  line('packed data alone', `${h.blockDataBytesPerReading.toFixed(2)} bytes/reading in ${h.blocks} blocks (${h.rawRowsLeft} newest readings left raw)`);
  line('read back through the merged path', h.lossless ? 'identical (timestamps, values bit for bit, quality)' : 'DIFFERENT');
  line('compaction time', `${h.compactS.toFixed(1)} s (${Math.round(h.readings / h.compactS).toLocaleString('en-US')} readings/s, one block per transaction)`);
  if (h.dialect === 'sqlite')
    line('whole file before / after compaction and VACUUM', `${mb(h.fileBytesBefore)} / ${mb(h.fileBytesAfterVacuum)} (all tables; no rollups written here)`);
}

export function historyJson(h: HistoryFigures): Record<string, number | boolean | string> {
  const r2 = (x: number) => Math.round(x * 100) / 100;
  return {
    bytesPerReading: r2(h.bytesPerReading),
    rawBytesPerReading: r2(h.rawBytesPerReading),
    historyBlockDataBytesPerReading: r2(h.blockDataBytesPerReading),
    historyReadings: h.readings,
    historyCompactS: r2(h.compactS),
    historyLossless: h.lossless,
    historyDialect: h.dialect,
    ...(h.dialect === 'postgres' ? { pgHeldBytesPerReading: r2(h.pgHeldBytesPerReading) } : {}),
  };
}
