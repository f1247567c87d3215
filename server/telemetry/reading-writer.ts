import { QueryTypes, type Sequelize } from 'sequelize';
import type { Logger } from '../logger';
import type { Counters } from './counters';
import { ReadingBlock, type IngestBuffer } from './ingest-buffer';
import { dialectOf, INSERT_READINGS_JSON_SQL, insertReadingsSql, readingsJson, upsertRollupsSql, type InsertedReadingRow, type RollupPeriod } from './sql';
import { openSqliteConnection } from '../db/sequelize';
import { faultPoint } from './fault-point';

export interface WriterOptions {
  /** Flush period (ms); a backlog is flushed again at once. */
  intervalMs?: number;
  /** Rows taken per flush: keeps one flush short so the event loop stays free. */
  maxRowsPerFlush?: number;
  /** Rows per multi-row INSERT statement. */
  rowsPerStatement?: number;
  /** How long a flush waits for more messages once an ack is held (ms): small, acks wait for the commit. */
  ackDelayMs?: number;
  /** SQLite: the database file, which the writer opens a connection of its own to. */
  sqliteFile?: string | null;
}

interface RollupRow {
  engineId: number;
  channel: number;
  minute: number;
  min: number | null;
  max: number | null;
  sum: number;
  count: number;
  bad: number;
}

/** Pre-aggregates a batch per (engine, channel, minute) so the upsert has one row per key. */
export function aggregateRollups(rows: ReadingBlock): RollupRow[] {
  // a numeric key (no string per reading); ids beyond its range fall back to a string key
  const byKey = new Map<number | string, RollupRow>();
  const { engine, channel, ts, value, quality } = rows;
  for (let i = 0; i < rows.length; i++) {
    const engineId = engine[i];
    const ch = channel[i];
    const t = ts[i];
    const minute = t - (t % 60_000);
    const key = engineId < 1_048_576 && engineId >= 0 && ch < 16 ? ((minute / 60_000) * 1_048_576 + engineId) * 16 + ch : `${engineId}:${ch}:${minute}`;
    let agg = byKey.get(key);
    if (!agg) {
      agg = { engineId, channel: ch, minute, min: null, max: null, sum: 0, count: 0, bad: 0 };
      byKey.set(key, agg);
    }
    if (quality[i] === 0) {
      const v = value[i];
      if (agg.min === null || v < agg.min) agg.min = v;
      if (agg.max === null || v > agg.max) agg.max = v;
      agg.sum += v;
      agg.count++;
    } else {
      agg.bad++;
    }
  }
  return [...byKey.values()];
}

/** Merges per-minute rows into per-hour rows (same key layout; `minute` holds the hour's start). */
export function aggregateHours(minutes: RollupRow[]): RollupRow[] {
  const byKey = new Map<string, RollupRow>();
  for (const m of minutes) {
    const hour = m.minute - (m.minute % 3_600_000);
    const key = `${m.engineId}:${m.channel}:${hour}`;
    const agg = byKey.get(key);
    if (!agg) {
      byKey.set(key, { ...m, minute: hour });
      continue;
    }
    if (m.min !== null && (agg.min === null || m.min < agg.min)) agg.min = m.min;
    if (m.max !== null && (agg.max === null || m.max > agg.max)) agg.max = m.max;
    agg.sum += m.sum;
    agg.count += m.count;
    agg.bad += m.bad;
  }
  return [...byKey.values()];
}

/** The slice of node-sqlite3's Database the writer uses. */
interface SqliteHandle {
  run(sql: string, params: unknown[], cb: (this: { changes: number }, err: Error | null) => void): unknown;
  all(sql: string, params: unknown[], cb: (err: Error | null, rows: InsertedReadingRow[]) => void): unknown;
  exec(sql: string, cb: (err: Error | null) => void): unknown;
  prepare(sql: string, cb: (err: Error | null) => void): SqliteStatement;
  close(cb: (err: Error | null) => void): unknown;
}

interface SqliteStatement {
  all(params: unknown[], cb: (err: Error | null, rows: InsertedReadingRow[]) => void): unknown;
  /** node-sqlite3 calls back with `this.changes`: rows the statement changed. */
  run(params: unknown[], cb: (this: { changes: number }, err: Error | null) => void): unknown;
  finalize(cb: () => void): unknown;
}

/**
 * Writes the buffer to `readings` and `rollups`: every flush is ONE transaction of multi-row INSERTs
 * (one call into the driver per few hundred rows, never one per row) plus the rollup upsert.
 * Readings already stored (same engine, channel, ts) are skipped by the insert and counted as duplicates;
 * the rollups add only the rows actually inserted. After COMMIT the buffer releases the MQTT acks of
 * every message whose rows are now all stored.
 *
 * SQLite: the writer opens and owns a connection of its own (same file, same pragmas as Sequelize's)
 * and talks to the node-sqlite3 handle directly. A Sequelize transaction would open and close
 * a fresh connection per flush, whose empty page cache has to re-read the index every time; measured
 * here that was 2-3x slower than one warm connection, and Sequelize's per-query work came on top.
 * PostgreSQL keeps the Sequelize transaction (pooled connections stay warm there).
 */
export class ReadingWriter {
  private timer: NodeJS.Timeout | null = null;
  private running: Promise<void> | null = null;
  private stopped = false;
  private readonly intervalMs: number;
  private readonly maxRows: number;
  private readonly perStatement: number;
  /** Rollup rows per upsert: 8 binds each, about as many binds as a reading insert. */
  private readonly perRollup: number;
  private readonly ackDelayMs: number;
  private timerDue = 0;
  /** The rows of the current flush (flushes never overlap, so one block serves them all). */
  private readonly block = new ReadingBlock(1024);
  private readonly dialect;
  private handle: Promise<SqliteHandle> | null = null;
  /** The full-size INSERT, prepared once: compiling a 500-row statement each time costs as much as running it. */
  private fullInsert: Promise<SqliteStatement> | null = null;
  /** The JSON insert (any row count), prepared once. */
  private jsonInsert: Promise<SqliteStatement> | null = null;
  /** The full-size rollup upsert, prepared once for the same reason (a flood fills several per flush). */
  private fullRollup: Promise<SqliteStatement> | null = null;
  private readonly sqliteFile: string | null;

  constructor(
    private readonly sequelize: Sequelize,
    private readonly buffer: IngestBuffer,
    private readonly counters: Counters,
    private readonly log: Logger,
    opts: WriterOptions = {},
  ) {
    this.intervalMs = opts.intervalMs ?? 100;
    this.maxRows = opts.maxRowsPerFlush ?? 10_000;
    this.perStatement = opts.rowsPerStatement ?? 500;
    this.perRollup = Math.floor((this.perStatement * 5) / 8);
    this.ackDelayMs = opts.ackDelayMs ?? 2;
    this.dialect = dialectOf(sequelize.getDialect());
    this.sqliteFile = opts.sqliteFile ?? null;
  }

  start(): void {
    this.schedule(this.intervalMs);
  }

  private schedule(ms: number): void {
    if (this.stopped || this.timer) return;
    this.timerDue = Date.now() + ms;
    this.timer = setTimeout(() => {
      this.timer = null;
      void this.flushOnce().then(() => this.schedule(this.nextDelay()));
    }, ms);
  }

  /** A backlog goes at once; held acks after a short gather; otherwise the regular period. */
  private nextDelay(): number {
    if (this.buffer.size >= this.maxRows) return 0;
    return this.buffer.size > 0 && this.buffer.pendingAcks > 0 ? this.ackDelayMs : this.intervalMs;
  }

  /** A message now waits for its ack: flush soon instead of at the end of the period (group commit). */
  nudge(): void {
    if (this.stopped || this.running || !this.timer) return; // a running flush reschedules by itself
    if (this.timerDue <= Date.now() + this.ackDelayMs) return;
    clearTimeout(this.timer);
    this.timer = null;
    this.schedule(this.ackDelayMs);
  }

  /** One flush (waits for a running one first, so flushes never overlap). */
  flushOnce(): Promise<void> {
    if (this.running) return this.running.then(() => this.flushOnce());
    this.running = this.writeBatch().finally(() => {
      this.running = null;
    });
    return this.running;
  }

  private async writeBatch(): Promise<void> {
    const rows = this.buffer.take(this.maxRows, this.block);
    if (rows.length === 0) {
      this.buffer.release();
      return;
    }
    const started = performance.now();
    try {
      const inserted = this.dialect === 'sqlite' ? await this.writeSqlite(rows) : await this.writeSequelize(rows);
      this.counters.batch(inserted, rows.length - inserted, performance.now() - started);
      this.buffer.committedRows(rows.length);
    } catch (err) {
      // Keep the rows: put them back in front and try again next tick. Accepted data is never dropped.
      this.log.error('telemetry: batch write failed, will retry', err);
      this.buffer.unshift(rows);
      await new Promise((r) => setTimeout(r, 500));
    }
    this.buffer.release();
  }

  private sqliteHandle(): Promise<SqliteHandle> {
    this.handle ??= (async () => {
      if (!this.sqliteFile) throw new Error('telemetry needs a SQLite database file (DATABASE_URL=sqlite:/path/file.sqlite), not :memory:');
      const db: SqliteHandle = await openSqliteConnection(this.sqliteFile);
      // a larger page cache keeps the hot part of the (engine, channel, ts) index in memory (bounded: 32 MB)
      await exec(db, 'PRAGMA cache_size=-32768');
      return db;
    })().catch((err) => {
      this.handle = null;
      throw err;
    });
    return this.handle;
  }

  /**
   * Returns how many rows were inserted (the rest were already stored). First one transaction of JSON inserts
   * without RETURNING (see INSERT_READINGS_JSON_SQL): when every statement inserted all of its rows, as in
   * the usual case, the rollups take the batch as it is. When a statement skipped a row (a redelivery or a
   * repeated reading), that transaction is rolled back and the batch is written again asking for the rows
   * inserted, so that only those reach the rollups.
   */
  private async writeSqlite(rows: ReadingBlock): Promise<number> {
    const db = await this.sqliteHandle();
    return (await this.writeSqliteOnce(db, rows, false)) ?? (await this.writeSqliteOnce(db, rows, true))!;
  }

  /** One transaction; null (rolled back) when `returning` is false and some row was already stored. */
  private async writeSqliteOnce(db: SqliteHandle, rows: ReadingBlock, returning: boolean): Promise<number | null> {
    await exec(db, 'BEGIN IMMEDIATE');
    try {
      const stored = new NewRows(rows);
      for (let i = 0; i < rows.length; i += this.perStatement) {
        const n = Math.min(this.perStatement, rows.length - i);
        if (returning) {
          const back =
            n === this.perStatement
              ? await allPrepared(await this.fullInsertStatement(db), readingBinds(rows, i, n))
              : await all(db, insertReadingsSql(n), readingBinds(rows, i, n));
          stored.add(i, n, back);
          continue;
        }
        const json = readingsJson(rows.engine, rows.channel, rows.ts, rows.value, rows.quality, i, n);
        const changes =
          json !== null
            ? await runPreparedChanges(await this.jsonInsertStatement(db), [json])
            : await runChanges(db, insertReadingsSql(n, false), readingBinds(rows, i, n));
        if (changes !== n) {
          await exec(db, 'ROLLBACK');
          return null;
        }
        stored.addAll(i, n);
      }
      const fullRollupSql = upsertRollupsSql(this.dialect, this.perRollup);
      for (const [sql, bind] of this.rollupStatements(stored.rows())) {
        if (sql === fullRollupSql) await runPrepared(await this.fullRollupStatement(db), bind);
        else await run(db, sql, bind);
      }
      await faultPoint('rollup');
      await exec(db, 'COMMIT');
      return stored.count;
    } catch (err) {
      await exec(db, 'ROLLBACK').catch(() => undefined);
      throw err;
    }
  }

  private jsonInsertStatement(db: SqliteHandle): Promise<SqliteStatement> {
    this.jsonInsert ??= new Promise<SqliteStatement>((resolve, reject) => {
      const stmt = db.prepare(INSERT_READINGS_JSON_SQL, (err) => (err ? reject(err) : resolve(stmt)));
    }).catch((err) => {
      this.jsonInsert = null;
      throw err;
    });
    return this.jsonInsert;
  }

  private fullRollupStatement(db: SqliteHandle): Promise<SqliteStatement> {
    this.fullRollup ??= new Promise<SqliteStatement>((resolve, reject) => {
      const stmt = db.prepare(upsertRollupsSql(this.dialect, this.perRollup), (err) => (err ? reject(err) : resolve(stmt)));
    }).catch((err) => {
      this.fullRollup = null;
      throw err;
    });
    return this.fullRollup;
  }

  private fullInsertStatement(db: SqliteHandle): Promise<SqliteStatement> {
    this.fullInsert ??= new Promise<SqliteStatement>((resolve, reject) => {
      const stmt = db.prepare(insertReadingsSql(this.perStatement), (err) => (err ? reject(err) : resolve(stmt)));
    }).catch((err) => {
      this.fullInsert = null;
      throw err;
    });
    return this.fullInsert;
  }

  private async writeSequelize(rows: ReadingBlock): Promise<number> {
    const sequelize = this.sequelize;
    const t = await sequelize.transaction();
    try {
      const stored = new NewRows(rows);
      for (let i = 0; i < rows.length; i += this.perStatement) {
        const n = Math.min(this.perStatement, rows.length - i);
        const back = await sequelize.query<InsertedReadingRow>(insertReadingsSql(n), {
          bind: readingBinds(rows, i, n),
          transaction: t,
          type: QueryTypes.SELECT,
          logging: false,
        });
        stored.add(i, n, back);
      }
      for (const [sql, bind] of this.rollupStatements(stored.rows()))
        await sequelize.query(sql, { bind, transaction: t, type: QueryTypes.INSERT, logging: false });
      await faultPoint('rollup');
      await t.commit();
      return stored.count;
    } catch (err) {
      await t.rollback().catch(() => undefined);
      throw err;
    }
  }

  /** The rollup upserts of a batch (per minute, then per hour), in statements of a few hundred keys. */
  private rollupStatements(rows: ReadingBlock): Array<[string, Array<number | null>]> {
    const minutes = aggregateRollups(rows);
    const out: Array<[string, Array<number | null>]> = [];
    this.upserts(minutes, 'minute', out);
    this.upserts(aggregateHours(minutes), 'hour', out);
    return out;
  }

  private upserts(rollups: RollupRow[], period: RollupPeriod, out: Array<[string, Array<number | null>]>): void {
    const perRollup = this.perRollup;
    for (let i = 0; i < rollups.length; i += perRollup) {
      const chunk = rollups.slice(i, i + perRollup);
      const bind: Array<number | null> = new Array(chunk.length * 8);
      let k = 0;
      for (const r of chunk) {
        bind[k++] = r.engineId;
        bind[k++] = r.channel;
        bind[k++] = r.minute;
        bind[k++] = r.min;
        bind[k++] = r.max;
        bind[k++] = r.sum;
        bind[k++] = r.count;
        bind[k++] = r.bad;
      }
      out.push([upsertRollupsSql(this.dialect, chunk.length, period), bind]);
    }
  }

  /** Stops the timer and writes everything still buffered. */
  async stop(): Promise<void> {
    this.stopped = true;
    if (this.timer) clearTimeout(this.timer);
    this.timer = null;
    if (this.running) await this.running;
    let attempts = 0;
    while (this.buffer.size > 0 && attempts < 100) {
      const before = this.buffer.size;
      await this.flushOnce();
      if (this.buffer.size >= before) attempts++;
    }
    // an unfinalized statement would keep the connection from closing
    for (const prepared of [this.fullInsert, this.fullRollup, this.jsonInsert]) {
      const stmt = await prepared?.catch(() => null);
      if (stmt) await new Promise<void>((resolve) => stmt.finalize(() => resolve()));
    }
    this.fullInsert = null;
    this.fullRollup = null;
    this.jsonInsert = null;
    const db = await this.handle?.catch(() => null);
    this.handle = null;
    if (db) await new Promise<void>((resolve) => db.close(() => resolve()));
  }
}

/**
 * The rows a flush actually inserted, for the rollups. A statement that inserted all of its rows (the
 * usual case) keeps the buffered objects; only one that skipped duplicates maps what RETURNING gave back.
 */
class NewRows {
  count = 0;
  private all = true;
  private kept: ReadingBlock | null = null;
  constructor(private readonly batch: ReadingBlock) {}

  /** Every row of [from, from + n) was inserted. */
  addAll(from: number, n: number): void {
    this.count += n;
    if (!this.all) this.kept!.append(this.batch, from, from + n);
  }

  add(from: number, n: number, back: InsertedReadingRow[]): void {
    this.count += back.length;
    if (back.length === n) {
      if (!this.all) this.kept!.append(this.batch, from, from + n);
      return;
    }
    if (this.all) {
      this.kept = new ReadingBlock(this.batch.length);
      this.kept.append(this.batch, 0, from);
    }
    this.all = false;
    for (const r of back) this.kept!.push(Number(r.engine_id), Number(r.channel), Number(r.ts), Number(r.value), Number(r.quality) === 0 ? 0 : 1);
  }

  rows(): ReadingBlock {
    return this.all ? this.batch : this.kept!;
  }
}

function readingBinds(rows: ReadingBlock, from: number, n: number): number[] {
  const bind: number[] = new Array(n * 5);
  const { engine, channel, ts, value, quality } = rows;
  let k = 0;
  for (let i = from; i < from + n; i++) {
    bind[k++] = engine[i];
    bind[k++] = channel[i];
    bind[k++] = ts[i];
    bind[k++] = value[i];
    bind[k++] = quality[i];
  }
  return bind;
}

const run = (db: SqliteHandle, sql: string, params: unknown[]) =>
  new Promise<void>((resolve, reject) => {
    db.run(sql, params, (err) => (err ? reject(err) : resolve()));
  });
const all = (db: SqliteHandle, sql: string, params: unknown[]) =>
  new Promise<InsertedReadingRow[]>((resolve, reject) => {
    db.all(sql, params, (err, rows) => (err ? reject(err) : resolve(rows)));
  });
/** Runs and gives the number of rows changed. */
const runChanges = (db: SqliteHandle, sql: string, params: unknown[]) =>
  new Promise<number>((resolve, reject) => {
    db.run(sql, params, function (err) {
      if (err) reject(err);
      else resolve(this.changes);
    });
  });
const runPreparedChanges = (stmt: SqliteStatement, params: unknown[]) =>
  new Promise<number>((resolve, reject) => {
    stmt.run(params, function (err) {
      if (err) reject(err);
      else resolve(this.changes);
    });
  });
const runPrepared = (stmt: SqliteStatement, params: unknown[]) =>
  new Promise<void>((resolve, reject) => {
    stmt.run(params, (err) => (err ? reject(err) : resolve()));
  });
const allPrepared = (stmt: SqliteStatement, params: unknown[]) =>
  new Promise<InsertedReadingRow[]>((resolve, reject) => {
    stmt.all(params, (err, rows) => (err ? reject(err) : resolve(rows)));
  });
const exec = (db: SqliteHandle, sql: string) =>
  new Promise<void>((resolve, reject) => {
    db.exec(sql, (err) => (err ? reject(err) : resolve()));
  });
