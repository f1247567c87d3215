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
const insertCache = new Map<number, string>();
/**
 * Multi-row insert that skips readings already stored (unique key engine_id, channel, ts: a QoS 1
 * redelivery or a repeated sample) and returns the rows it did insert, so that only those reach the
 * rollups. Same text and semantics in SQLite (3.35+) and PostgreSQL (9.5+); in both, a key repeated
 * inside one statement is inserted once.
 */
export function insertReadingsSql(rows: number): string {
  let sql = insertCache.get(rows);
  if (!sql) {
    sql = `INSERT INTO readings (engine_id, channel, ts, value, quality) VALUES ${placeholders(rows, 5)}
ON CONFLICT (engine_id, channel, ts) DO NOTHING RETURNING engine_id, channel, ts, value, quality`;
    insertCache.set(rows, sql);
  }
  return sql;
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
