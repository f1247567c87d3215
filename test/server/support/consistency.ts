/**
 * Checks of a database file after a crash: the file itself (SQLite integrity_check, or amcheck on every
 * readings partition on PostgreSQL) and the rollups against the raw readings they summarise.
 */
import { isPg } from './test-db';
import type { Db } from './telemetry-server';

/** Throws unless the database's own check passes. */
export async function expectIntact(db: Db): Promise<void> {
  if (isPg) {
    // the PostgreSQL twin of integrity_check: amcheck verifies each partition's pages, and its unique index against them
    await db.exec('CREATE EXTENSION IF NOT EXISTS amcheck');
    const parts = await db.all<{ t: string; i: string }>(`SELECT i.indrelid::regclass::text AS t, i.indexrelid::regclass::text AS i
      FROM pg_inherits h JOIN pg_index i ON i.indrelid = h.inhrelid WHERE h.inhparent = 'readings'::regclass`);
    if (parts.length < 2) throw new Error(`expected monthly partitions of readings, found ${parts.length}`);
    for (const p of parts) {
      const bad = await db.all(`SELECT * FROM verify_heapam('${p.t}')`);
      if (bad.length) throw new Error(`verify_heapam(${p.t}): ${JSON.stringify(bad)}`);
      await db.exec(`SELECT bt_index_check('${p.i}'::regclass, true)`);
    }
  } else {
    const r = await db.get<{ integrity_check: string }>('PRAGMA integrity_check');
    if (r.integrity_check !== 'ok') throw new Error(`integrity_check: ${r.integrity_check}`);
  }
}

/**
 * Per channel and minute: raw readings counted, and the rollup's count + bad_count, of one engine; the same
 * per hour against the per-hour rollups.
 */
export async function rawAndRollupCounts(db: Db, engineId: number): Promise<{ raw: unknown[]; rollups: unknown[]; rawHours: unknown[]; hourly: unknown[] }> {
  const raw = await db.all<{ channel: number; minute: number; n: number }>(
    `SELECT channel, ts - (ts % 60000) AS minute, COUNT(*) AS n FROM readings WHERE engine_id = ? GROUP BY channel, minute ORDER BY channel, minute`,
    [engineId],
  );
  const rollups = await db.all<{ channel: number; minute: number; n: number }>(
    `SELECT channel, minute, "count" + bad_count AS n FROM rollups WHERE engine_id = ? ORDER BY channel, minute`,
    [engineId],
  );
  const rawHours = await db.all(
    `SELECT channel, ts - (ts % 3600000) AS hour, COUNT(*) AS n FROM readings WHERE engine_id = ? GROUP BY channel, hour ORDER BY channel, hour`,
    [engineId],
  );
  const hourly = await db.all(`SELECT channel, hour, "count" + bad_count AS n FROM rollups_hourly WHERE engine_id = ? ORDER BY channel, hour`, [engineId]);
  return { raw, rollups, rawHours, hourly };
}
