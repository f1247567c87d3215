import { QueryTypes, Transaction, type Sequelize } from 'sequelize';
import { CHANNELS, CHANNEL_KEYS } from '../../shared/channels';
import type { Config } from '../config';
import type { Logger } from '../logger';
import { decodeBlock, encodeBlock } from '../../shared/history/block-codec';

export const DAY_MS = 24 * 3600 * 1000;

/** First instant whose raw readings are kept (older ones are removed); null when raw readings are kept for good. */
export function rawKeptFrom(rawRetentionDays: number, now: number): number | null {
  return rawRetentionDays > 0 ? now - rawRetentionDays * DAY_MS : null;
}

export interface SweepResult {
  deleted: number;
  /** Compacted readings removed (whole blocks, and the older part of the block holding the cutoff). */
  deletedCompacted: number;
  /** Steps of at most RETENTION_BATCH rows, each followed by a pause. */
  batches: number;
  cutoff: number | null;
  /** False when the sweep was stopped before it finished. */
  complete: boolean;
}

export interface Retention {
  /** Remove raw readings older than the retention now (the timer also does this). */
  sweep(): Promise<SweepResult>;
  /** Ends the running sweep at its next batch and stops the timer. */
  stop(): Promise<void>;
}

export interface RetentionOptions {
  sequelize: Sequelize;
  log: Logger;
  config: Pick<Config, 'rawRetentionDays' | 'retentionBatch' | 'retentionPauseMs' | 'retentionEveryMs'>;
  now?: () => number;
  /** Start sweeping on a timer (the first sweep right away); off for tests that call sweep() themselves. */
  timer?: boolean;
}

const CODES = CHANNEL_KEYS.map((k) => CHANNELS[k].code);

/**
 * Removes raw readings older than RAW_RETENTION_DAYS in small batches with a pause between them, so the
 * ingest writer never waits long for the database's write lock. Rollups are never touched: old ranges
 * are still drawn from them. Works per engine and channel along the (engine_id, channel, ts) index:
 * finds the timestamp of the last row the step may still remove, then deletes up to it in one short statement.
 */
export function startRetention(opts: RetentionOptions): Retention {
  const { sequelize, log, config } = opts;
  const now = opts.now ?? Date.now;
  const big = sequelize.getDialect() === 'postgres' ? 'BIGINT' : 'INTEGER';
  // node-sqlite3 binds numbers beyond 32 bits as REAL: cast the timestamps
  const boundSql = `SELECT ts FROM readings WHERE engine_id = $1 AND channel = $2 AND ts < CAST($3 AS ${big})
    ORDER BY ts LIMIT 1 OFFSET $4`;
  const deleteSql = `DELETE FROM readings WHERE engine_id = $1 AND channel = $2 AND ts < CAST($3 AS ${big})`;
  // compacted blocks (server/services/history): whole blocks before the cutoff, a few at a time, then the one holding it
  const oldBlocksSql = `DELETE FROM reading_blocks WHERE engine_id = $1 AND channel = $2 AND block_start IN (SELECT block_start FROM reading_blocks
    WHERE engine_id = $1 AND channel = $2 AND last_ts < CAST($3 AS ${big}) ORDER BY block_start LIMIT 50) RETURNING "count"`;
  const edgeBlockSql = `SELECT block_start, data FROM reading_blocks WHERE engine_id = $1 AND channel = $2 AND block_start < CAST($3 AS ${big})
    AND first_ts < CAST($3 AS ${big}) AND last_ts >= CAST($3 AS ${big})`;
  let stopped = false;
  let running: Promise<SweepResult> | null = null;
  let timer: NodeJS.Timeout | null = null;
  let wake: (() => void) | null = null;

  const pause = (ms: number) =>
    new Promise<void>((resolve) => {
      const t = setTimeout(() => {
        wake = null;
        resolve();
      }, ms);
      wake = () => {
        clearTimeout(t);
        wake = null;
        resolve();
      };
    });

  async function run(): Promise<SweepResult> {
    const cutoff = rawKeptFrom(config.rawRetentionDays, now());
    const result: SweepResult = { deleted: 0, deletedCompacted: 0, batches: 0, cutoff, complete: false };
    if (cutoff === null) return { ...result, complete: true };
    const started = Date.now();
    const engines = await sequelize.query<{ id: number }>('SELECT id FROM engines ORDER BY id', { type: QueryTypes.SELECT });
    // a step removes at most retentionBatch rows (over one or several engine/channel pairs), then pauses
    let budget = config.retentionBatch;
    for (const { id } of engines) {
      for (const code of CODES) {
        for (;;) {
          if (stopped) return result;
          // its own short transaction (its own connection with SQLite): while it waits for the write lock,
          // the API's reads on the shared connection do not wait behind it
          const { bound, n } = await sequelize.transaction({ type: Transaction.TYPES.IMMEDIATE }, async (transaction) => {
            const found = await sequelize.query<{ ts: number }>(boundSql, { bind: [id, code, cutoff, budget - 1], type: QueryTypes.SELECT, transaction });
            // up to and including the timestamp of the budget's last row, or everything left below the cutoff
            const upTo = found.length ? Number(found[0].ts) + 1 : cutoff;
            const removed = (await sequelize.query(deleteSql, { bind: [id, code, upTo], type: QueryTypes.BULKDELETE, transaction })) as unknown as number;
            return { bound: found, n: removed };
          });
          result.deleted += n;
          budget -= n;
          if (budget <= 0) {
            result.batches++;
            budget = config.retentionBatch;
            await pause(config.retentionPauseMs);
          }
          if (!bound.length) break;
        }
        for (;;) {
          if (stopped) return result;
          const { removed, last } = await sequelize.transaction({ type: Transaction.TYPES.IMMEDIATE }, async (transaction) => {
            const gone = await sequelize.query<{ count: number | string }>(oldBlocksSql, { bind: [id, code, cutoff], type: QueryTypes.SELECT, transaction });
            let removed = gone.reduce((sum, b) => sum + Number(b.count), 0);
            if (gone.length < 50) {
              const [edge] = await sequelize.query<{ block_start: number | string; data: Buffer }>(edgeBlockSql, {
                bind: [id, code, cutoff],
                type: QueryTypes.SELECT,
                transaction,
              });
              if (edge) {
                const all = decodeBlock(edge.data);
                const kept = all.filter((r) => r.ts >= cutoff);
                removed += all.length - kept.length;
                await sequelize.query(
                  `UPDATE reading_blocks SET first_ts = CAST($4 AS ${big}), "count" = $5, data = $6
                    WHERE engine_id = $1 AND channel = $2 AND block_start = CAST($3 AS ${big})`,
                  { bind: [id, code, Number(edge.block_start), kept[0].ts, kept.length, Buffer.from(encodeBlock(kept))], transaction },
                );
              }
            }
            return { removed, last: gone.length < 50 };
          });
          result.deletedCompacted += removed;
          if (last) break;
          await pause(config.retentionPauseMs);
        }
      }
    }
    if (budget < config.retentionBatch) result.batches++;
    result.complete = true;
    if (result.deleted || result.deletedCompacted) {
      log.info(
        `retention: ${result.deleted} raw and ${result.deletedCompacted} compacted readings before ${new Date(cutoff).toISOString()} removed in ${result.batches} batches, ${((Date.now() - started) / 1000).toFixed(1)} s`,
      );
    }
    return result;
  }

  function sweep(): Promise<SweepResult> {
    running ??= run()
      .catch((err) => {
        log.error('retention: sweep failed', err);
        return { deleted: 0, deletedCompacted: 0, batches: 0, cutoff: null, complete: false };
      })
      .finally(() => {
        running = null;
      });
    return running;
  }

  if (opts.timer !== false && config.rawRetentionDays > 0) {
    void sweep();
    timer = setInterval(() => void sweep(), config.retentionEveryMs);
    timer.unref();
  }

  return {
    sweep,
    async stop() {
      stopped = true;
      if (timer) clearInterval(timer);
      wake?.();
      if (running) await running;
    },
  };
}
