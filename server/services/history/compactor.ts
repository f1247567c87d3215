/**
 * Background compaction of raw history: raw readings older than COMPACT_AFTER_H move, one (engine, channel,
 * hour) per transaction, into a packed block of `reading_blocks` (shared/history/block-codec.ts), about 1-3
 * bytes a reading instead of about 47. Recent readings stay raw, so the writer's inserts stay as fast as they were.
 *
 * One step: take the hour's raw rows out of `readings` (DELETE ... RETURNING, so a reading inserted meanwhile
 * is either in the step or stays raw, never lost), merge them with the block already stored for that hour (a
 * late reading, or one redelivered after compaction: one reading per timestamp, the one stored first), write
 * the block back. Each step is its own short transaction, followed by a pause, so the writer never waits long
 * for SQLite's write lock, and a kill -9 loses nothing: a step is all or nothing. A duplicate dropped by the
 * merge had been counted in the rollups when it arrived; the step takes it out of them again (count and sum,
 * or bad_count).
 *
 * The newest raw reading of each channel stays raw (the live state's LATEST_READINGS_SQL reads it at start).
 */
import { QueryTypes, Transaction, type Sequelize } from 'sequelize';
import { CHANNELS, CHANNEL_KEYS } from '../../../shared/channels';
import { decodeBlock, encodeBlock, mergeReadings, type BlockReading } from '../../../shared/history/block-codec';
import type { Config } from '../../config';
import type { Logger } from '../../logger';
import { BLOCK_MS, blockStartOf } from './raw-range';

export const HOUR_MS = 3_600_000;
/** Time between passes, and the delay of the first pass after start. */
export const COMPACT_EVERY_MS = 10 * 60_000;
export const COMPACT_FIRST_AFTER_MS = 60_000;

export interface CompactPass {
  /** Blocks written (a block merged again counts again). */
  blocks: number;
  /** Raw rows moved into blocks. */
  readings: number;
  /** Raw rows whose timestamp a block already held (redeliveries): dropped, and taken out of the rollups. */
  duplicates: number;
  /** Raw readings before this instant are compacted (whole hours only); null when compaction is off. */
  cutoff: number | null;
  complete: boolean;
}

export interface Compactor {
  /** One pass over every engine channel now (the timer also runs them); a pass already running is joined. */
  pass(): Promise<CompactPass>;
  /** Ends the running pass at its next step and stops the timer. */
  stop(): Promise<void>;
}

export interface CompactorOptions {
  sequelize: Sequelize;
  log: Logger;
  config: Pick<Config, 'compactAfterH'>;
  now?: () => number;
  /** Pause between steps, ms (default 20): the time the writer gets the database to itself. */
  pauseMs?: number;
  /** Run passes on a timer; off for tests and the bench, which call pass() themselves. */
  timer?: boolean;
}

const CODES = CHANNEL_KEYS.map((k) => CHANNELS[k].code);

interface Row {
  ts: number | string;
  value: number | string;
  quality: number | string;
}

export function startCompactor(opts: CompactorOptions): Compactor {
  const { sequelize, log, config } = opts;
  const now = opts.now ?? Date.now;
  const pauseMs = opts.pauseMs ?? 20;
  const postgres = sequelize.getDialect() === 'postgres';
  const int = postgres ? 'BIGINT' : 'INTEGER';
  let stopped = false;
  let running: Promise<CompactPass> | null = null;
  const timers: NodeJS.Timeout[] = [];

  const q = <T extends object>(sql: string, bind: unknown[], transaction: Transaction) =>
    sequelize.query<T>(sql, { bind, type: QueryTypes.SELECT, transaction, logging: false });

  /** Takes readings out of the rollups they were counted in when they arrived (redeliveries dropped by a merge). */
  async function uncount(engineId: number, channel: number, dropped: BlockReading[], transaction: Transaction): Promise<void> {
    for (const [table, key, unit] of [
      ['rollups', 'minute', 60_000],
      ['rollups_hourly', 'hour', HOUR_MS],
    ] as const) {
      for (const r of dropped) {
        const at = r.ts - (((r.ts % unit) + unit) % unit);
        const set = r.quality === 0 ? `"count" = "count" - 1, "sum" = "sum" - $4` : 'bad_count = bad_count - 1';
        await sequelize.query(`UPDATE ${table} SET ${set} WHERE engine_id = $1 AND channel = $2 AND ${key} = CAST($3 AS ${int})`, {
          bind: r.quality === 0 ? [engineId, channel, at, r.value] : [engineId, channel, at],
          transaction,
          logging: false,
        });
      }
    }
  }

  /** Compacts the oldest block of raw readings before `cutoff` of one engine channel; null when there is none. */
  async function step(engineId: number, channel: number, cutoff: number): Promise<{ moved: number; duplicates: number } | null> {
    return sequelize.transaction({ type: Transaction.TYPES.IMMEDIATE }, async (transaction) => {
      // several servers on one PostgreSQL: one compacts a channel at a time
      if (postgres) await sequelize.query('SELECT pg_advisory_xact_lock($1, $2)', { bind: [engineId, channel], transaction, logging: false });
      // two statements: SQLite answers a lone MIN or MAX with one index seek, not both in one query
      const edge = async (fn: 'MIN' | 'MAX') => {
        const [row] = await q<{ ts: number | string | null }>(
          `SELECT ${fn}(ts) AS ts FROM readings WHERE engine_id = $1 AND channel = $2`,
          [engineId, channel],
          transaction,
        );
        return row?.ts === null || row?.ts === undefined ? null : Number(row.ts);
      };
      const first = await edge('MIN');
      if (first === null) return null;
      // the channel's newest reading stays raw
      const limit = Math.min(cutoff, (await edge('MAX'))!);
      if (first >= limit) return null;
      const start = blockStartOf(first);
      const upper = Math.min(start + BLOCK_MS, limit);
      const taken = await q<Row>(
        `DELETE FROM readings WHERE engine_id = $1 AND channel = $2 AND ts >= CAST($3 AS ${int}) AND ts < CAST($4 AS ${int}) RETURNING ts, value, quality`,
        [engineId, channel, start, upper],
        transaction,
      );
      const [existing] = await q<{ data: Buffer }>(
        `SELECT data FROM reading_blocks WHERE engine_id = $1 AND channel = $2 AND block_start = CAST($3 AS ${int})`,
        [engineId, channel, start],
        transaction,
      );
      const incoming = taken.map((r) => ({ ts: Number(r.ts), value: Number(r.value), quality: Number(r.quality) }));
      const { merged, dropped } = mergeReadings(existing ? decodeBlock(existing.data) : [], incoming);
      const data = Buffer.from(encodeBlock(merged));
      await sequelize.query(
        `INSERT INTO reading_blocks (engine_id, channel, block_start, first_ts, last_ts, "count", data)
          VALUES ($1, $2, CAST($3 AS ${int}), CAST($4 AS ${int}), CAST($5 AS ${int}), $6, $7)
          ON CONFLICT (engine_id, channel, block_start) DO UPDATE SET first_ts = excluded.first_ts, last_ts = excluded.last_ts,
            "count" = excluded."count", data = excluded.data`,
        { bind: [engineId, channel, start, merged[0].ts, merged[merged.length - 1].ts, merged.length, data], transaction, logging: false },
      );
      if (dropped.length) await uncount(engineId, channel, dropped, transaction);
      return { moved: taken.length, duplicates: dropped.length };
    });
  }

  const pause = () => new Promise<void>((resolve) => (pauseMs > 0 ? setTimeout(resolve, pauseMs) : setImmediate(resolve)));

  async function run(): Promise<CompactPass> {
    if (config.compactAfterH <= 0) return { blocks: 0, readings: 0, duplicates: 0, cutoff: null, complete: true };
    // whole hours only: a block is written once its hour is past the cutoff
    const cutoff = blockStartOf(now() - config.compactAfterH * HOUR_MS);
    const result: CompactPass = { blocks: 0, readings: 0, duplicates: 0, cutoff, complete: false };
    const started = Date.now();
    const engines = await sequelize.query<{ id: number }>('SELECT id FROM engines ORDER BY id', { type: QueryTypes.SELECT, logging: false });
    for (const { id } of engines) {
      for (const code of CODES) {
        for (;;) {
          if (stopped) return result;
          const done = await step(Number(id), code, cutoff);
          if (!done) break;
          result.blocks++;
          result.readings += done.moved;
          result.duplicates += done.duplicates;
          await pause();
        }
      }
    }
    result.complete = true;
    if (result.blocks) {
      log.info(
        `history: ${result.readings} raw readings before ${new Date(cutoff).toISOString()} packed into ${result.blocks} blocks` +
          `${result.duplicates ? ` (${result.duplicates} redelivered readings dropped)` : ''}, ${((Date.now() - started) / 1000).toFixed(1)} s`,
      );
    }
    return result;
  }

  function pass(): Promise<CompactPass> {
    running ??= run()
      .catch((err) => {
        log.error('history: compaction pass failed', err);
        return { blocks: 0, readings: 0, duplicates: 0, cutoff: null, complete: false };
      })
      .finally(() => {
        running = null;
      });
    return running;
  }

  if (opts.timer !== false && config.compactAfterH > 0) {
    const first = setTimeout(() => {
      void pass();
      const every = setInterval(() => void pass(), COMPACT_EVERY_MS);
      every.unref();
      timers.push(every);
    }, COMPACT_FIRST_AFTER_MS);
    first.unref();
    timers.push(first);
  }

  return {
    pass,
    async stop() {
      stopped = true;
      for (const t of timers) clearTimeout(t);
      if (running) await running;
    },
  };
}
