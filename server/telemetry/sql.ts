/**
 * Hand-written SQL of the telemetry path, one twin per dialect (SQLite first, PostgreSQL for growth).
 * Placeholders are Sequelize bind parameters ($1, $2, ...), which both dialects take.
 */
export type Dialect = 'sqlite' | 'postgres';

export function dialectOf(name: string): Dialect {
  return name === 'postgres' ? 'postgres' : 'sqlite';
}

/** Sequelize's own text form of a DATE, accepted by both dialects and read back by models. */
export function sqlDate(ms: number): string {
  return new Date(ms).toISOString().replace('T', ' ').replace('Z', ' +00:00');
}

function placeholders(rows: number, cols: number): string {
  const parts: string[] = new Array(rows);
  let n = 1;
  for (let r = 0; r < rows; r++) {
    const cells: string[] = new Array(cols);
    for (let c = 0; c < cols; c++) cells[c] = '$' + n++;
    parts[r] = '(' + cells.join(',') + ')';
  }
  return parts.join(',');
}

// The statement text depends only on the row count, so it is built once per count.
const insertCache = new Map<string, string>();
/**
 * Multi-row insert that skips readings already stored (unique key engine_id, channel, ts: a QoS 1
 * redelivery or a repeated sample) and returns the rows it did insert, so that only those reach the
 * rollups. Same text and semantics in SQLite (3.35+) and PostgreSQL (9.5+); in both, a key repeated
 * inside one statement is inserted once. `returning: false` leaves out the RETURNING clause (the caller
 * then compares the count of changed rows with the rows it sent).
 */
export function insertReadingsSql(rows: number, returning = true): string {
  const key = `${rows}${returning ? 'r' : ''}`;
  let sql = insertCache.get(key);
  if (!sql) {
    sql = `INSERT INTO readings (engine_id, channel, ts, value, quality) VALUES ${placeholders(rows, 5)}
ON CONFLICT (engine_id, channel, ts) DO NOTHING${returning ? ' RETURNING engine_id, channel, ts, value, quality' : ''}`;
    insertCache.set(key, sql);
  }
  return sql;
}

/**
 * SQLite only: the same insert with every row in ONE JSON text parameter, without RETURNING (see
 * `readingsJson`). node-sqlite3 converts each bound number with a handful of N-API calls on the event loop
 * (measured: about two thirds of the main thread's insert cost at 2,500 numbers a statement, RETURNING's
 * row objects the rest); one text parameter is one conversion, and SQLite parses the JSON in the driver's
 * worker thread. Values travel as an integer and two powers of two, because SQLite's decimal-to-double
 * conversion is not always correctly rounded (1 ulp off for about 1 value in 16,000 measured); an integer
 * of at most 53 bits divided by powers of two is exact.
 */
export const INSERT_READINGS_JSON_SQL = `INSERT INTO readings (engine_id, channel, ts, value, quality)
SELECT value->>0, value->>1, value->>2, CAST(value->>3 AS REAL) / (1 << (value->>4)) / (1 << (value->>5)), value->>6
FROM json_each($1) WHERE true ON CONFLICT (engine_id, channel, ts) DO NOTHING`;

const F64 = new Float64Array(1);
const U32 = new Uint32Array(F64.buffer);
/** Index of the double's high and low 32-bit words in U32 (the platform's byte order). */
const HI = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1 ? 1 : 0;
const LO = 1 - HI;

/**
 * `m,a,b` with value === m / 2^a / 2^b exactly (|m| < 2^53, a <= 62, b <= 62), or null when the value has
 * no such form (not finite, subnormal, over 2^53 and not a safe integer, under about 2^-71). -0 becomes 0,
 * as it does when bound as a number.
 */
export function exactValueParts(v: number): string | null {
  if (Number.isSafeInteger(v)) return `${v},0,0`;
  F64[0] = v;
  const hi = U32[HI];
  const biased = (hi >>> 20) & 0x7ff;
  if (biased === 0 || biased === 0x7ff) return null;
  const shift = 1075 - biased; // v = mantissa (53 bits with the implicit one) / 2^shift
  if (shift <= 0 || shift > 124) return null;
  const m = ((hi & 0xfffff) + 0x100000) * 4294967296 + U32[LO];
  const a = shift > 62 ? 62 : shift;
  return `${hi >>> 31 ? -m : m},${a},${shift - a}`;
}

/**
 * The JSON text of rows [from, from + n) for INSERT_READINGS_JSON_SQL: `[[engine, channel, ts, m, a, b, quality], ...]`.
 * Null when a row cannot travel exactly this way (see exactValueParts, or a time that is not a safe integer):
 * the caller binds that statement's numbers instead.
 */
export function readingsJson(
  engine: ArrayLike<number>,
  channel: ArrayLike<number>,
  ts: ArrayLike<number>,
  value: ArrayLike<number>,
  quality: ArrayLike<number>,
  from: number,
  n: number,
): string | null {
  let text = '[';
  for (let i = from; i < from + n; i++) {
    const parts = exactValueParts(value[i]);
    const t = ts[i];
    if (parts === null || !Number.isSafeInteger(t)) return null;
    text += `${i === from ? '' : ','}[${engine[i]},${channel[i]},${t},${parts},${quality[i]}]`;
  }
  return text + ']';
}

/** A row as the insert's RETURNING gives it back (BIGINT ts may come back as a string from PostgreSQL). */
export interface InsertedReadingRow {
  engine_id: number | string;
  channel: number | string;
  ts: number | string;
  value: number | string;
  quality: number | string;
}

/** Per-minute rollups (`rollups`, key `minute`) or per-hour ones (`rollups_hourly`, key `hour`, migration 0020). */
export type RollupPeriod = 'minute' | 'hour';

const rollupCache = new Map<string, string>();
/** Merges pre-aggregated rows; min/max stay NULL while a minute (hour) has only bad readings. */
export function upsertRollupsSql(dialect: Dialect, rows: number, period: RollupPeriod = 'minute'): string {
  const key = dialect + period + rows;
  let sql = rollupCache.get(key);
  if (!sql) {
    const t = period === 'minute' ? 'rollups' : 'rollups_hourly';
    const least =
      dialect === 'postgres'
        ? `LEAST(${t}."min", excluded."min")` // LEAST/GREATEST skip NULLs
        : `min(coalesce(${t}."min", excluded."min"), coalesce(excluded."min", ${t}."min"))`;
    const greatest =
      dialect === 'postgres' ? `GREATEST(${t}."max", excluded."max")` : `max(coalesce(${t}."max", excluded."max"), coalesce(excluded."max", ${t}."max"))`;
    sql = `INSERT INTO ${t} (engine_id, channel, ${period}, "min", "max", "sum", "count", bad_count) VALUES ${placeholders(rows, 8)}
ON CONFLICT (engine_id, channel, ${period}) DO UPDATE SET
  "min" = ${least}, "max" = ${greatest},
  "sum" = ${t}."sum" + excluded."sum", "count" = ${t}."count" + excluded."count",
  bad_count = ${t}.bad_count + excluded.bad_count`;
    rollupCache.set(key, sql);
  }
  return sql;
}

/** Newest reading of every engine/channel that has one; rollups give the pairs cheaply, MAX(ts) is an index seek. */
export const LATEST_READINGS_SQL = `SELECT r.engine_id AS "engineId", r.channel AS "channel", r.ts AS "ts", r.value AS "value", r.quality AS "quality"
FROM (SELECT engine_id, channel FROM rollups GROUP BY engine_id, channel) p
JOIN readings r ON r.engine_id = p.engine_id AND r.channel = p.channel
  AND r.ts = (SELECT MAX(x.ts) FROM readings x WHERE x.engine_id = p.engine_id AND x.channel = p.channel)`;

export const DEVICE_BY_USERNAME_SQL = `SELECT id, engine_id AS "engineId", secret_hash AS "secretHash", revoked_at AS "revokedAt",
  sparkplug_group_id AS "spGroup", sparkplug_edge_node_id AS "spNode", sparkplug_device_id AS "spDevice" FROM devices WHERE username = $1`;

export function touchDevicesSql(count: number): string {
  const ids = Array.from({ length: count }, (_, i) => '$' + (i + 2)).join(',');
  return `UPDATE devices SET last_seen_at = $1 WHERE id IN (${ids})`;
}

export function upsertRejectionsSql(rows: number): string {
  return `INSERT INTO device_rejections (device_id, reason, "count", last_at, last_detail) VALUES ${placeholders(rows, 5)}
ON CONFLICT (device_id, reason) DO UPDATE SET "count" = device_rejections."count" + excluded."count",
  last_at = excluded.last_at, last_detail = excluded.last_detail`;
}
