import fs from 'node:fs';
import { QueryTypes } from 'sequelize';
import { makeTestApp, type TestApp } from './helpers';

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
  it('holds on the default connection', async () => {
    expect(await pragma('journal_mode')).toBe('wal');
    expect(await pragma('synchronous')).toBe(1); // 1 = NORMAL (sqlite.org/pragma.html#pragma_synchronous)
    expect(await pragma('busy_timeout')).toBe(5000);
    expect(await pragma('foreign_keys')).toBe(1);
  });

  it('holds inside a transaction, which Sequelize runs on a separate connection', async () => {
    await t.ctx.sequelize.transaction(async (tx) => {
      expect(await pragma('journal_mode', tx)).toBe('wal');
      expect(await pragma('synchronous', tx)).toBe(1);
      expect(await pragma('busy_timeout', tx)).toBe(5000);
      expect(await pragma('foreign_keys', tx)).toBe(1);
    });
  });
});

describe('migration 0001-core', () => {
  it('creates exactly the core tables and records itself', async () => {
    const rows = await t.ctx.sequelize.query<{ name: string }>(`SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%'`, { type: QueryTypes.SELECT });
    const names = rows.map((r) => r.name);
    for (const n of ['users', 'sites', 'engines', 'devices', 'device_rejections', 'readings', 'rollups', 'schema_migrations']) expect(names).toContain(n);
    const applied = await t.ctx.sequelize.query<{ name: string }>('SELECT name FROM schema_migrations', { type: QueryTypes.SELECT });
    expect(applied.map((a) => a.name)).toContain('0001-core');
  });

  it('indexes readings by (engine_id, channel, ts) and keys rollups by (engine_id, channel, minute)', async () => {
    const idx = await t.ctx.sequelize.query<{ name: string }>(`SELECT name FROM pragma_index_info('readings_engine_channel_ts') ORDER BY seqno`, { type: QueryTypes.SELECT });
    expect(idx.map((c) => c.name)).toEqual(['engine_id', 'channel', 'ts']);
    const cols = await t.ctx.sequelize.query<{ name: string; pk: number }>(`SELECT name, pk FROM pragma_table_info('rollups') WHERE pk > 0 ORDER BY pk`, { type: QueryTypes.SELECT });
    expect(cols.map((c) => c.name)).toEqual(['engine_id', 'channel', 'minute']);
  });

  it('enforces foreign keys (engine needs an existing site)', async () => {
    const now = new Date().toISOString();
    await expect(
      t.ctx.sequelize.query(
        `INSERT INTO engines (site_id, name, duty, capacity_l, coolant_family, glycol_type, glycol_percent, cap_pressure_kpa, oil_drain_interval_h, created_at, updated_at)
         VALUES (9999, 'x', 'standby', 10, 'conventional', 'ethylene', 50, 100, 250, '${now}', '${now}')`,
      ),
    ).rejects.toThrow(/FOREIGN KEY/);
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
