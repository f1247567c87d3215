/**
 * PostgreSQL only: `readings` is partitioned by range of ts (milliseconds, UTC) into one table per calendar
 * month, plus a DEFAULT partition that catches a reading outside every month made so far (nothing is lost).
 * The server creates the coming months ahead; retention drops whole months (DROP TABLE: instant, no
 * bloat, no long DELETE). SQLite keeps one plain table; these functions do nothing there.
 */
import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import type { Logger } from '../logger';

/** Months created ahead of the current one, so the writer never waits for DDL. */
export const MONTHS_AHEAD = 3;
export const DEFAULT_PARTITION = 'readings_default';

export const monthStart = (ms: number): number => {
  const d = new Date(ms);
  return Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), 1);
};
export const nextMonth = (ms: number): number => {
  const d = new Date(ms);
  return Date.UTC(d.getUTCFullYear(), d.getUTCMonth() + 1, 1);
};
/** readings_2026_12 for December 2026 (UTC). */
export const partitionName = (ms: number): string => {
  const d = new Date(ms);
  return `readings_${d.getUTCFullYear()}_${String(d.getUTCMonth() + 1).padStart(2, '0')}`;
};

const isPostgres = (sequelize: Sequelize) => sequelize.getDialect() === 'postgres';

export interface ReadingPartition {
  name: string;
  /** [from, to) in ms; null for the DEFAULT partition. */
  from: number | null;
  to: number | null;
}

/** The partitions of `readings` with their bounds; [] when the table is not partitioned (SQLite). */
export async function listReadingPartitions(sequelize: Sequelize, transaction?: Transaction): Promise<ReadingPartition[]> {
  if (!isPostgres(sequelize)) return [];
  const rows = await sequelize.query<{ name: string; bound: string }>(
    `SELECT c.relname AS name, pg_get_expr(c.relpartbound, c.oid) AS bound FROM pg_inherits i
       JOIN pg_class c ON c.oid = i.inhrelid WHERE i.inhparent = 'readings'::regclass ORDER BY c.relname`,
    { type: QueryTypes.SELECT, transaction, logging: false },
  );
  return rows.map((r) => {
    const m = /FROM \('?(-?\d+)'?\) TO \('?(-?\d+)'?\)/.exec(r.bound);
    return { name: r.name, from: m ? Number(m[1]) : null, to: m ? Number(m[2]) : null };
  });
}

/**
 * Creates the month partition holding `ms` unless it exists. Readings of that month already caught by the
 * DEFAULT partition are moved into it first (attaching would fail while DEFAULT holds any of them).
 * Serialised by an advisory lock, so several servers may call it at once.
 */
async function createMonth(sequelize: Sequelize, ms: number, transaction: Transaction): Promise<boolean> {
  const from = monthStart(ms);
  const to = nextMonth(ms);
  const name = partitionName(ms);
  const q = (sql: string) => sequelize.query(sql, { transaction, logging: false });
  await q(`SELECT pg_advisory_xact_lock(hashtext('jacketwatch readings partitions'))`);
  if ((await listReadingPartitions(sequelize, transaction)).some((p) => p.name === name)) return false;
  await q(`CREATE TABLE ${name} (LIKE readings INCLUDING DEFAULTS INCLUDING CONSTRAINTS)`);
  await q(`WITH moved AS (DELETE FROM ${DEFAULT_PARTITION} WHERE ts >= ${from} AND ts < ${to} RETURNING engine_id, channel, ts, value, quality)
    INSERT INTO ${name} (engine_id, channel, ts, value, quality) SELECT engine_id, channel, ts, value, quality FROM moved`);
  await q(`ALTER TABLE readings ATTACH PARTITION ${name} FOR VALUES FROM (${from}) TO (${to})`);
  return true;
}

/** Makes sure every month from `fromMs` to `toMs` (inclusive) has its partition; returns the names created. */
export async function ensureReadingPartitions(sequelize: Sequelize, fromMs: number, toMs: number, transaction?: Transaction): Promise<string[]> {
  if (!isPostgres(sequelize) || !(await isPartitioned(sequelize, transaction))) return [];
  const created: string[] = [];
  for (let m = monthStart(fromMs); m <= toMs; m = nextMonth(m)) {
    const made = transaction ? await createMonth(sequelize, m, transaction) : await sequelize.transaction((tx) => createMonth(sequelize, m, tx));
    if (made) created.push(partitionName(m));
  }
  return created;
}

/** Drops every month partition that ends at or before `cutoffMs` (whole months only); returns their names. */
export async function dropReadingPartitionsBefore(sequelize: Sequelize, cutoffMs: number): Promise<string[]> {
  const old = (await listReadingPartitions(sequelize)).filter((p) => p.to !== null && p.to <= cutoffMs);
  for (const p of old) await sequelize.query(`DROP TABLE IF EXISTS ${p.name}`, { logging: false });
  return old.map((p) => p.name);
}

export async function isPartitioned(sequelize: Sequelize, transaction?: Transaction): Promise<boolean> {
  if (!isPostgres(sequelize)) return false;
  const rows = await sequelize.query(`SELECT 1 FROM pg_partitioned_table WHERE partrelid = to_regclass('readings')`, {
    type: QueryTypes.SELECT,
    transaction,
    logging: false,
  });
  return rows.length > 0;
}

const MAINTAIN_EVERY_MS = 6 * 3_600_000;

/**
 * At start and every 6 h: the current month and MONTHS_AHEAD more exist; with `retentionDays`, months that
 * ended longer ago than that are dropped. Returns a stop function.
 */
export function startReadingPartitionUpkeep(sequelize: Sequelize, log: Logger, retentionDays: number | null): { ready: Promise<void>; stop(): void } {
  if (!isPostgres(sequelize)) return { ready: Promise.resolve(), stop: () => undefined };
  const pass = async () => {
    const now = Date.now();
    let ahead = now;
    for (let i = 0; i < MONTHS_AHEAD; i++) ahead = nextMonth(ahead);
    const created = await ensureReadingPartitions(sequelize, now, ahead);
    if (created.length) log.info(`readings partitions created: ${created.join(', ')}`);
    if (retentionDays !== null) {
      const dropped = await dropReadingPartitionsBefore(sequelize, now - retentionDays * 86_400_000);
      if (dropped.length) log.info(`readings partitions dropped (older than ${retentionDays} days): ${dropped.join(', ')}`);
    }
  };
  const guarded = () => pass().catch((err) => log.error('readings partitions: upkeep failed', err));
  const timer = setInterval(guarded, MAINTAIN_EVERY_MS);
  timer.unref();
  return { ready: guarded(), stop: () => clearInterval(timer) };
}
