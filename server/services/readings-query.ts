import { QueryTypes, type Sequelize } from 'sequelize';
import { CHANNELS, type ChannelKey } from '../../shared/channels';
import { rawKeptFrom } from './retention';
import { hasBlocks, readRawRange } from './history/raw-range';

export interface Bucket {
  /** Start of the bucket, ms since epoch. */
  t: number;
  min: number;
  max: number;
  mean: number;
  count: number;
}

export interface BucketResult {
  buckets: Bucket[];
  /** 'rollup': summaries, because the span is long or it reaches back past the raw retention. */
  source: 'raw' | 'rollup';
  /** Which summaries a 'rollup' answer read: per minute, or per hour when a bucket spans an hour or more (null: raw). */
  rollupPeriod: 'minute' | 'hour' | null;
  /** RAW_RETENTION_DAYS (0: raw readings are kept for good). */
  rawRetentionDays: number;
  /** Raw readings are kept from this instant on (ms); null when kept for good. */
  rawKeptFrom: number | null;
  /** True when the range starts before rawKeptFrom: the raw readings of its start are removed, the rollups remain. */
  beyondRawRetention: boolean;
}

export interface RawRetention {
  rawRetentionDays: number;
  now: number;
}

export interface ReadingsQuery {
  engineId: number;
  channel: ChannelKey;
  from: number;
  to: number;
  points: number;
}

/** Spans up to this length come from raw readings; longer ones from the per-minute rollups. */
export const RAW_SPAN_LIMIT_MS = 6 * 3600 * 1000;
const MINUTE_MS = 60_000;
const HOUR_MS = 3_600_000;

// node-sqlite3 binds numbers beyond 32 bits as REAL: cast so the bucket division stays integer
const intCast = (sequelize: Sequelize, n: number) => `CAST($${n} AS ${sequelize.getDialect() === 'postgres' ? 'BIGINT' : 'INTEGER'})`;

interface Row {
  b: number | string;
  mn: number;
  mx: number;
  mean: number;
  n: number | string;
}

/**
 * Bucketed min/max/mean/count of good readings over [from, to): one grouped SQL query. A range reaching back
 * past the raw retention is answered from the rollups whatever its length, and says so.
 */
export async function queryBuckets(
  sequelize: Sequelize,
  q: ReadingsQuery,
  retention: RawRetention = { rawRetentionDays: 0, now: Date.now() },
): Promise<BucketResult> {
  const code = CHANNELS[q.channel].code;
  const span = q.to - q.from;
  const keptFrom = rawKeptFrom(retention.rawRetentionDays, retention.now);
  const beyondRawRetention = keptFrom !== null && q.from < keptFrom;
  const source: BucketResult['source'] = span <= RAW_SPAN_LIMIT_MS && !beyondRawRetention ? 'raw' : 'rollup';
  const c = (n: number) => intCast(sequelize, n);
  let from = q.from;
  let width: number;
  let sql: string;
  let period: 'minute' | 'hour' | null = null;
  if (source === 'raw') {
    width = Math.max(1, Math.ceil(span / q.points));
    sql = `SELECT (ts - ${c(3)}) / ${c(5)} AS b, MIN(value) AS mn, MAX(value) AS mx, AVG(value) AS mean, COUNT(*) AS n
      FROM readings
      WHERE engine_id = $1 AND channel = $2 AND quality = 0 AND ts >= ${c(3)} AND ts < ${c(4)}
      GROUP BY b ORDER BY b`;
  } else {
    // buckets are whole minutes, aligned to the minute of `from`; when a bucket would span half an hour or more
    // (a 30-day chart), whole hours from the per-hour rollups: 24 rows a day instead of 1,440
    const minuteFrom = Math.floor(q.from / MINUTE_MS) * MINUTE_MS;
    period = Math.ceil((q.to - minuteFrom) / MINUTE_MS / q.points) >= 30 ? 'hour' : 'minute';
    const unit = period === 'hour' ? HOUR_MS : MINUTE_MS;
    from = Math.floor(q.from / unit) * unit;
    width = Math.max(1, Math.ceil((q.to - from) / unit / q.points)) * unit;
    const [table, key] = period === 'hour' ? ['rollups_hourly', 'hour'] : ['rollups', 'minute'];
    sql = `SELECT (${key} - ${c(3)}) / ${c(5)} AS b, MIN("min") AS mn, MAX("max") AS mx,
        SUM("sum") * 1.0 / SUM("count") AS mean, SUM("count") AS n
      FROM ${table}
      WHERE engine_id = $1 AND channel = $2 AND "count" > 0 AND ${key} >= ${c(3)} AND ${key} < ${c(4)}
      GROUP BY b ORDER BY b`;
  }
  const rows =
    source === 'raw' && (await hasBlocks(sequelize, q.engineId, code, from, q.to))
      ? await bucketsInMemory(sequelize, q.engineId, code, from, q.to, width)
      : await sequelize.query<Row>(sql, { bind: [q.engineId, code, from, q.to, width], type: QueryTypes.SELECT });
  return {
    source,
    rollupPeriod: period,
    rawRetentionDays: retention.rawRetentionDays,
    rawKeptFrom: keptFrom,
    beyondRawRetention,
    buckets: rows.map((r) => ({ t: from + Number(r.b) * width, min: Number(r.mn), max: Number(r.mx), mean: Number(r.mean), count: Number(r.n) })),
  };
}

/**
 * The raw query's buckets when part of the range is compacted (older than COMPACT_AFTER_H): the readings come
 * through the merged read path and are bucketed here, the same way the SQL does.
 */
async function bucketsInMemory(sequelize: Sequelize, engineId: number, code: number, from: number, to: number, width: number): Promise<Row[]> {
  const readings = await readRawRange(sequelize, engineId, code, from, to, { goodOnly: true });
  const rows: Row[] = [];
  let cur: Row | null = null;
  let sum = 0;
  for (const r of readings) {
    const b = Math.floor((r.ts - from) / width);
    if (!cur || cur.b !== b) {
      if (cur) cur.mean = sum / Number(cur.n);
      cur = { b, mn: r.value, mx: r.value, mean: 0, n: 0 };
      sum = 0;
      rows.push(cur);
    }
    if (r.value < cur.mn) cur.mn = r.value;
    if (r.value > cur.mx) cur.mx = r.value;
    sum += r.value;
    cur.n = Number(cur.n) + 1;
  }
  if (cur) cur.mean = sum / Number(cur.n);
  return rows;
}
