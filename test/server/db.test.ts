import fs from 'node:fs';
import { QueryTypes } from 'sequelize';
import { isPg, makeTestApp, type TestApp } from './helpers';
import { createTestDatabase } from './support/test-db';

/** SQLite by nature (pragmas, sqlite_master): skipped on PostgreSQL, where a twin below checks the same behaviour. */
const sqliteOnly = isPg ? it.skip : it;
const pgOnly = isPg ? it : it.skip;

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp({ signIn: false });
});
afterAll(() => t.close());

const pragma = async (name: string, transaction?: import('sequelize').Transaction) => {
  const rows = await t.ctx.sequelize.query<Record<string, unknown>>(`PRAGMA ${name}`, { type: QueryTypes.SELECT, transaction });
  return Object.values(rows[0])[0];
};

describe('SQLite connection pragmas', () => {
  sqliteOnly('holds on the default connection', async () => {
    expect(await pragma('journal_mode')).toBe('wal');
    expect(await pragma('synchronous')).toBe(1); // 1 = NORMAL (sqlite.org/pragma.html#pragma_synchronous)
    expect(await pragma('busy_timeout')).toBe(5000);
    expect(await pragma('foreign_keys')).toBe(1);
  });

  sqliteOnly('holds inside a transaction, which Sequelize runs on a separate connection', async () => {
    await t.ctx.sequelize.transaction(async (tx) => {
      expect(await pragma('journal_mode', tx)).toBe('wal');
      expect(await pragma('synchronous', tx)).toBe(1);
      expect(await pragma('busy_timeout', tx)).toBe(5000);
      expect(await pragma('foreign_keys', tx)).toBe(1);
    });
  });
});

describe('database errors in the log', () => {
  it('carry the database message and the SQL (Sequelize puts the call site, not the message, in the stack)', async () => {
    const { describeError } = await import('../../server/logger');
    const err = await t.ctx.sequelize.query('SELECT no_such_column FROM readings').then(
      () => null,
      (e: Error) => e,
    );
    expect(err).not.toBeNull();
    const text = describeError(err!);
    // SQLite: "no such column: no_such_column"; PostgreSQL: 'column "no_such_column" does not exist'
    expect(text.split('\n')[0]).toMatch(/^SequelizeDatabaseError: .*no_such_column/);
    expect(text).toContain('sql: SELECT no_such_column FROM readings');
  });
});

describe('migration 0001-core', () => {
  sqliteOnly('creates exactly the core tables and records itself', async () => {
    const rows = await t.ctx.sequelize.query<{ name: string }>(`SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%'`, {
      type: QueryTypes.SELECT,
    });
    const names = rows.map((r) => r.name);
    for (const n of ['users', 'sites', 'engines', 'devices', 'device_rejections', 'readings', 'rollups', 'schema_migrations']) expect(names).toContain(n);
    const applied = await t.ctx.sequelize.query<{ name: string }>('SELECT name FROM schema_migrations', { type: QueryTypes.SELECT });
    expect(applied.map((a) => a.name)).toContain('0001-core');
  });

  sqliteOnly('indexes readings by (engine_id, channel, ts) and keys rollups by (engine_id, channel, minute)', async () => {
    const idx = await t.ctx.sequelize.query<{ name: string }>(`SELECT name FROM pragma_index_info('readings_engine_channel_ts') ORDER BY seqno`, {
      type: QueryTypes.SELECT,
    });
    expect(idx.map((c) => c.name)).toEqual(['engine_id', 'channel', 'ts']);
    const cols = await t.ctx.sequelize.query<{ name: string; pk: number }>(`SELECT name, pk FROM pragma_table_info('rollups') WHERE pk > 0 ORDER BY pk`, {
      type: QueryTypes.SELECT,
    });
    expect(cols.map((c) => c.name)).toEqual(['engine_id', 'channel', 'minute']);
  });

  it('enforces foreign keys (engine needs an existing site)', async () => {
    const now = new Date().toISOString();
    await expect(
      t.ctx.sequelize.query(
        `INSERT INTO engines (site_id, name, duty, capacity_l, coolant_family, glycol_type, glycol_percent, cap_pressure_kpa, oil_drain_interval_h, created_at, updated_at)
         VALUES (9999, 'x', 'standby', 10, 'conventional', 'ethylene', 50, 100, 250, '${now}', '${now}')`,
      ),
    ).rejects.toThrow(/FOREIGN KEY|foreign key constraint/);
  });

  pgOnly('PostgreSQL: creates the core tables and records itself', async () => {
    const rows = await t.ctx.sequelize.query<{ name: string }>(`SELECT table_name AS name FROM information_schema.tables WHERE table_schema = 'public'`, {
      type: QueryTypes.SELECT,
    });
    const names = rows.map((r) => r.name);
    for (const n of ['users', 'sites', 'engines', 'devices', 'device_rejections', 'readings', 'rollups', 'schema_migrations']) expect(names).toContain(n);
    const applied = await t.ctx.sequelize.query<{ name: string }>('SELECT name FROM schema_migrations', { type: QueryTypes.SELECT });
    expect(applied.map((a) => a.name)).toContain('0001-core');
  });

  pgOnly('PostgreSQL: indexes readings by (engine_id, channel, ts) and keys rollups by (engine_id, channel, minute)', async () => {
    const cols = (table: string, index: string) =>
      t.ctx.sequelize.query<{ name: string }>(
        `SELECT a.attname AS name FROM pg_index i JOIN pg_class c ON c.oid = i.indexrelid
         JOIN LATERAL unnest(i.indkey) WITH ORDINALITY AS k(attnum, n) ON TRUE
         JOIN pg_attribute a ON a.attrelid = i.indrelid AND a.attnum = k.attnum
       WHERE i.indrelid = '${table}'::regclass AND ${index} ORDER BY k.n`,
        { type: QueryTypes.SELECT },
      );
    expect((await cols('readings', `c.relname = 'readings_engine_channel_ts'`)).map((c) => c.name)).toEqual(['engine_id', 'channel', 'ts']);
    expect((await cols('rollups', 'i.indisprimary')).map((c) => c.name)).toEqual(['engine_id', 'channel', 'minute']);
  });

  pgOnly('PostgreSQL: timestamps in milliseconds are 64-bit (BIGINT)', async () => {
    const types = await t.ctx.sequelize.query<{ c: string; t: string }>(
      `SELECT table_name || '.' || column_name AS c, data_type AS t FROM information_schema.columns
        WHERE (table_name, column_name) IN (('readings', 'ts'), ('rollups', 'minute'))`,
      { type: QueryTypes.SELECT },
    );
    expect(types.sort((a, b) => a.c.localeCompare(b.c))).toEqual([
      { c: 'readings.ts', t: 'bigint' },
      { c: 'rollups.minute', t: 'bigint' },
    ]);
  });

  it('is idempotent: a second run applies nothing', async () => {
    const { migrate } = await import('../../server/db/migrate');
    expect(await migrate(t.ctx.sequelize)).toEqual([]);
  });

  it('writes the JWT secret with mode 600', () => {
    const mode = fs.statSync(`${t.dataDir}/jwt-secret`).mode & 0o777;
    expect(mode).toBe(0o600);
  });
});

describe('migration 0006-readings-unique', () => {
  it('removes stored duplicates, recomputes the rollups of their minutes from raw, and makes (engine_id, channel, ts) unique', async () => {
    const os = await import('node:os');
    const path = await import('node:path');
    const { createMigrator } = await import('../../server/db/migrate');
    const { createSequelize } = await import('../../server/db/sequelize');
    const { loadConfig } = await import('../../server/config');
    const { createLogger } = await import('../../server/logger');
    const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'jw-m6-'));
    const db = await createTestDatabase(dataDir);
    const sequelize = createSequelize(loadConfig({ DATA_DIR: dataDir, DATABASE_URL: db.url, LOG_LEVEL: 'error' }), createLogger('error'));
    try {
      await createMigrator(sequelize).up({ to: '0005-user-sites' });
      const q = (sql: string) => sequelize.query(sql, { type: QueryTypes.SELECT });
      const m = 60_000 * 29_000_000; // a whole minute
      // engine 1 channel 1: minute m has 10 @ m, 20 @ m+1 stored twice, bad 500 @ m+2 stored twice; minute m+60000 untouched
      await sequelize.query(`INSERT INTO readings (engine_id, channel, ts, value, quality) VALUES
        (1,1,${m},10,0), (1,1,${m + 1},20,0), (1,1,${m + 1},20,0), (1,1,${m + 2},500,1), (1,1,${m + 2},500,1), (1,1,${m + 60_000},30,0), (2,1,${m},40,0)`);
      // rollups as the old writer kept them: every stored copy counted
      await sequelize.query(`INSERT INTO rollups (engine_id, channel, minute, "min", "max", "sum", "count", bad_count) VALUES
        (1,1,${m},10,20,50,3,2), (1,1,${m + 60_000},30,30,30,1,0), (2,1,${m},40,40,40,1,0)`);
      await createMigrator(sequelize).up();
      // PostgreSQL gives COUNT and BIGINT as text: compare numbers on both
      const nums = (rows: object[]) => rows.map((row) => Object.fromEntries(Object.entries(row).map(([k, v]) => [k, v === null ? v : Number(v)])));
      expect(nums(await q('SELECT COUNT(*) AS n FROM readings'))).toEqual([{ n: 5 }]);
      expect(await q('SELECT engine_id, channel, ts, COUNT(*) AS n FROM readings GROUP BY engine_id, channel, ts HAVING COUNT(*) > 1')).toEqual([]);
      expect(nums(await q(`SELECT engine_id AS e, minute, "min", "max", "sum", "count", bad_count AS bad FROM rollups ORDER BY engine_id, minute`))).toEqual([
        { e: 1, minute: m, min: 10, max: 20, sum: 30, count: 2, bad: 1 },
        { e: 1, minute: m + 60_000, min: 30, max: 30, sum: 30, count: 1, bad: 0 },
        { e: 2, minute: m, min: 40, max: 40, sum: 40, count: 1, bad: 0 },
      ]);
      const idx = await q(
        isPg
          ? `SELECT CASE WHEN i.indisunique THEN 1 ELSE 0 END AS u FROM pg_index i JOIN pg_class c ON c.oid = i.indexrelid WHERE c.relname = 'readings_engine_channel_ts'`
          : `SELECT "unique" AS u FROM pragma_index_list('readings') WHERE name = 'readings_engine_channel_ts'`,
      );
      expect(idx).toEqual([{ u: 1 }]);
      await expect(sequelize.query(`INSERT INTO readings (engine_id, channel, ts, value, quality) VALUES (2,1,${m},41,0)`)).rejects.toThrow(
        /Validation error|UNIQUE/,
      );
      expect(
        await q(
          isPg
            ? `SELECT table_name AS name FROM information_schema.tables WHERE table_name = 'readings_dup_minutes'`
            : `SELECT name FROM sqlite_master WHERE name = 'readings_dup_minutes'`,
        ),
      ).toEqual([]);
    } finally {
      await sequelize.close();
      await db.drop();
      fs.rmSync(dataDir, { recursive: true, force: true });
    }
  });
});
