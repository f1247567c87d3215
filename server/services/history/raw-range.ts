/**
 * The one read path of raw history: the rows still in `readings` (recent, or late arrivals not yet compacted)
 * merged with the compacted blocks of `reading_blocks`. Every reader of raw readings goes through here, so a
 * range across the boundary of recent and compacted data reads as it was stored.
 */
import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import { decodeBlock, mergeReadings, type BlockReading } from '../../../shared/history/block-codec';

/** Length of a block: one hour, the same span as the per-hour rollups. */
export const BLOCK_MS = 3_600_000;
export const blockStartOf = (ts: number): number => ts - (((ts % BLOCK_MS) + BLOCK_MS) % BLOCK_MS);

export type StoredReading = BlockReading;

const intType = (sequelize: Sequelize) => (sequelize.getDialect() === 'postgres' ? 'BIGINT' : 'INTEGER');

interface BlockRow {
  block_start: number | string;
  data?: Buffer | Uint8Array;
}

const toReading = (r: { ts: number | string; value: number | string; quality: number | string }): StoredReading => ({
  ts: Number(r.ts),
  value: Number(r.value),
  quality: Number(r.quality),
});

export interface RawRangeOptions {
  /** At most this many readings, the earliest of the range. */
  limit?: number;
  /** Only good-quality readings. */
  goodOnly?: boolean;
  transaction?: Transaction;
}

/**
 * Readings of one engine channel with from <= ts < to, in time order, one per timestamp (where a raw row and a
 * block hold the same timestamp - a redelivery not merged yet - the block's reading is the one stored first).
 */
export async function readRawRange(
  sequelize: Sequelize,
  engineId: number,
  channel: number,
  from: number,
  to: number,
  opts: RawRangeOptions = {},
): Promise<StoredReading[]> {
  if (!(to > from)) return [];
  const int = intType(sequelize);
  const { transaction, limit } = opts;
  // node-sqlite3 binds numbers beyond 32 bits as REAL: cast the timestamps
  const raw = await sequelize.query<{ ts: number | string; value: number | string; quality: number | string }>(
    `SELECT ts, value, quality FROM readings WHERE engine_id = $1 AND channel = $2 AND ts >= CAST($3 AS ${int}) AND ts < CAST($4 AS ${int})${
      opts.goodOnly ? ' AND quality = 0' : ''
    } ORDER BY ts${limit ? ` LIMIT ${Math.floor(limit)}` : ''}`,
    { bind: [engineId, channel, from, to], type: QueryTypes.SELECT, transaction, logging: false },
  );
  // blocks overlapping the range, found on the primary key (block_start) and checked on first/last ts
  const where = `engine_id = $1 AND channel = $2 AND block_start > CAST($3 AS ${int}) AND block_start < CAST($4 AS ${int})
    AND last_ts >= CAST($5 AS ${int}) AND first_ts < CAST($4 AS ${int})`;
  const bind = [engineId, channel, from - BLOCK_MS, to, from];
  const metas = await sequelize.query<BlockRow>(`SELECT block_start FROM reading_blocks WHERE ${where} ORDER BY block_start`, {
    bind,
    type: QueryTypes.SELECT,
    transaction,
    logging: false,
  });
  if (!metas.length) return raw.map(toReading);
  // blocks do not overlap in time: with a limit, stop reading them once they hold that many readings of the range
  const stored: StoredReading[] = [];
  const CHUNK = 24;
  for (let k = 0; k < metas.length && !(limit && stored.length >= limit); k += CHUNK) {
    const last = metas[Math.min(k + CHUNK, metas.length) - 1];
    const blocks = await sequelize.query<BlockRow>(
      `SELECT block_start, data FROM reading_blocks WHERE ${where} AND block_start >= CAST($6 AS ${int}) AND block_start <= CAST($7 AS ${int})
        ORDER BY block_start`,
      { bind: [...bind, Number(metas[k].block_start), Number(last.block_start)], type: QueryTypes.SELECT, transaction, logging: false },
    );
    for (const b of blocks) {
      for (const r of decodeBlock(b.data!)) {
        if (r.ts >= from && r.ts < to && (!opts.goodOnly || r.quality === 0)) stored.push(r);
      }
    }
  }
  let { merged } = mergeReadings(stored, raw.map(toReading));
  // the first `limit` of the merge are the range's first `limit`: the raw rows and blocks left out are all later
  if (limit && merged.length > limit) merged = merged.slice(0, limit);
  return merged;
}

/** Whether any compacted block of this engine channel overlaps [from, to). */
export async function hasBlocks(sequelize: Sequelize, engineId: number, channel: number, from: number, to: number): Promise<boolean> {
  const int = intType(sequelize);
  const rows = await sequelize.query(
    `SELECT 1 AS x FROM reading_blocks WHERE engine_id = $1 AND channel = $2 AND block_start > CAST($3 AS ${int}) AND block_start < CAST($4 AS ${int})
      AND last_ts >= CAST($5 AS ${int}) AND first_ts < CAST($4 AS ${int}) LIMIT 1`,
    { bind: [engineId, channel, from - BLOCK_MS, to, from], type: QueryTypes.SELECT, logging: false },
  );
  return rows.length > 0;
}
