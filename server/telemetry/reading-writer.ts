import { QueryTypes, Transaction, type Sequelize } from 'sequelize';
import type { Logger } from '../logger';
import type { Counters } from './counters';
import type { BufferedReading, IngestBuffer } from './ingest-buffer';
import { dialectOf, insertReadingsSql, upsertRollupsSql } from './sql';

export interface WriterOptions {
  /** Flush period (ms); a backlog is flushed again at once. */
  intervalMs?: number;
  /** Rows taken per flush: keeps one flush short so the event loop stays free. */
  maxRowsPerFlush?: number;
  /** Rows per multi-row INSERT statement. */
  rowsPerStatement?: number;
}

interface RollupRow {
  engineId: number; channel: number; minute: number;
  min: number | null; max: number | null; sum: number; count: number; bad: number;
}

/** Pre-aggregates a batch per (engine, channel, minute) so the upsert has one row per key. */
export function aggregateRollups(rows: BufferedReading[]): RollupRow[] {
  const byKey = new Map<string, RollupRow>();
  for (const r of rows) {
    const minute = r.ts - (r.ts % 60_000);
    const key = `${r.engineId}:${r.channel}:${minute}`;
    let agg = byKey.get(key);
    if (!agg) {
      agg = { engineId: r.engineId, channel: r.channel, minute, min: null, max: null, sum: 0, count: 0, bad: 0 };
      byKey.set(key, agg);
    }
    if (r.quality === 0) {
      agg.min = agg.min === null || r.value < agg.min ? r.value : agg.min;
      agg.max = agg.max === null || r.value > agg.max ? r.value : agg.max;
      agg.sum += r.value;
      agg.count++;
    } else {
      agg.bad++;
    }
  }
  return [...byKey.values()];
}

/**
 * Writes the buffer to `readings` and `rollups`: every flush is ONE transaction of multi-row INSERTs
 * (one call into the driver per few hundred rows, never one per row) plus one rollup upsert.
 */
export class ReadingWriter {
  private timer: NodeJS.Timeout | null = null;
  private running: Promise<void> | null = null;
  private stopped = false;
  private readonly intervalMs: number;
  private readonly maxRows: number;
  private readonly perStatement: number;
  private readonly dialect;

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
    this.dialect = dialectOf(sequelize.getDialect());
  }

  start(): void {
    this.schedule(this.intervalMs);
  }

  private schedule(ms: number): void {
    if (this.stopped || this.timer) return;
    this.timer = setTimeout(() => {
      this.timer = null;
      void this.flushOnce().then(() => this.schedule(this.buffer.size > 0 && this.buffer.size >= this.maxRows ? 0 : this.intervalMs));
    }, ms);
  }

  /** One flush (waits for a running one first, so flushes never overlap). */
  flushOnce(): Promise<void> {
    if (this.running) return this.running.then(() => this.flushOnce());
    this.running = this.writeBatch().finally(() => { this.running = null; });
    return this.running;
  }

  private async writeBatch(): Promise<void> {
    const rows = this.buffer.take(this.maxRows);
    if (rows.length === 0) {
      this.buffer.release();
      return;
    }
    const started = performance.now();
    try {
      await this.write(rows);
      this.counters.batch(rows.length, performance.now() - started);
    } catch (err) {
      // Keep the rows: put them back in front and try again next tick. Accepted data is never dropped.
      this.log.error('telemetry: batch write failed, will retry', err);
      this.buffer.unshift(rows);
      await new Promise((r) => setTimeout(r, 500));
    }
    this.buffer.release();
  }

  private async write(rows: BufferedReading[]): Promise<void> {
    const rollups = aggregateRollups(rows);
    const sequelize = this.sequelize;
    const t = await sequelize.transaction(this.dialect === 'sqlite' ? { type: Transaction.TYPES.IMMEDIATE } : {});
    try {
      for (let i = 0; i < rows.length; i += this.perStatement) {
        const chunk = rows.slice(i, i + this.perStatement);
        const bind: number[] = new Array(chunk.length * 5);
        let k = 0;
        for (const r of chunk) {
          bind[k++] = r.engineId; bind[k++] = r.channel; bind[k++] = r.ts; bind[k++] = r.value; bind[k++] = r.quality;
        }
        await sequelize.query(insertReadingsSql(chunk.length), { bind, transaction: t, type: QueryTypes.INSERT, logging: false });
      }
      const perRollup = Math.floor(this.perStatement * 5 / 8);
      for (let i = 0; i < rollups.length; i += perRollup) {
        const chunk = rollups.slice(i, i + perRollup);
        const bind: Array<number | null> = [];
        for (const r of chunk) bind.push(r.engineId, r.channel, r.minute, r.min, r.max, r.sum, r.count, r.bad);
        await sequelize.query(upsertRollupsSql(this.dialect, chunk.length), { bind, transaction: t, type: QueryTypes.INSERT, logging: false });
      }
      await t.commit();
    } catch (err) {
      await t.rollback().catch(() => undefined);
      throw err;
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
  }
}
