/**
 * Readings partitioned by month on PostgreSQL (migration 0013, server/db/reading-partitions.ts): months made
 * ahead, a reading outside them kept by the DEFAULT partition and moved when its month is made, retention
 * by dropping whole months, existing rows carried over by the migration. Partitioning is PostgreSQL's
 * (SQLite keeps one plain table): those tests are skipped on SQLite, where the no-op is checked instead.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { QueryTypes, type Sequelize } from 'sequelize';
import { loadConfig } from '../../server/config';
import { createMigrator } from '../../server/db/migrate';
import {
  dropReadingPartitionsBefore,
  ensureReadingPartitions,
  isPartitioned,
  listReadingPartitions,
  monthStart,
  MONTHS_AHEAD,
  nextMonth,
  partitionName,
} from '../../server/db/reading-partitions';
import { createSequelize } from '../../server/db/sequelize';
import { createLogger } from '../../server/logger';
import { insertReadingsSql } from '../../server/telemetry/sql';
import { isPg, makeTestApp, type TestApp } from './helpers';
import { createTestDatabase } from './support/test-db';

const pgOnly = isPg ? it : it.skip; // declarative partitioning is PostgreSQL's
const sqliteOnly = isPg ? it.skip : it;

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp({ signIn: false });
});
afterAll(() => t.close());

const rows = <T extends object>(s: Sequelize, sql: string) => s.query<T>(sql, { type: QueryTypes.SELECT });
/** Which partition holds each reading of engine 7, by ts. */
const placed = (s: Sequelize) =>
  rows<{ ts: string; p: string }>(s, `SELECT ts, tableoid::regclass::text AS p FROM readings WHERE engine_id = 7 ORDER BY ts`).then((r) =>
    r.map((x) => [Number(x.ts), x.p]),
  );
const insert = (s: Sequelize, ts: number[]) => s.query(insertReadingsSql(ts.length), { bind: ts.flatMap((x) => [7, 1, x, 80, 0]) });

sqliteOnly('SQLite: readings stays one plain table and the partition upkeep does nothing', async () => {
  expect(await isPartitioned(t.ctx.sequelize)).toBe(false);
  expect(await ensureReadingPartitions(t.ctx.sequelize, Date.now(), Date.now())).toEqual([]);
  expect(await dropReadingPartitionsBefore(t.ctx.sequelize, Date.now())).toEqual([]);
});

pgOnly('PostgreSQL: readings is partitioned by month, this month and the next ones exist, a reading lands in its month', async () => {
  const s = t.ctx.sequelize;
  expect(await isPartitioned(s)).toBe(true);
  const names = (await listReadingPartitions(s)).map((p) => p.name);
  let m = Date.now();
  for (let i = 0; i <= MONTHS_AHEAD; i++, m = nextMonth(m)) expect(names).toContain(partitionName(m));
  expect(names).toContain('readings_default');
  const now = Date.now();
  await insert(s, [now]);
  expect(await placed(s)).toEqual([[now, partitionName(now)]]);
  // the unique key still spans the partitions: a redelivery is skipped
  const [again] = await insert(s, [now]);
  expect(again).toEqual([]);
  await s.query('DELETE FROM readings WHERE engine_id = 7');
});

pgOnly('PostgreSQL: a reading beyond the months made is kept by DEFAULT and moved into its month when that is made', async () => {
  const s = t.ctx.sequelize;
  const far = Date.UTC(2031, 4, 17, 12); // May 2031, beyond the months made ahead
  await insert(s, [far, far + 1]);
  expect(await placed(s)).toEqual([
    [far, 'readings_default'],
    [far + 1, 'readings_default'],
  ]);
  expect(await ensureReadingPartitions(s, far, far)).toEqual(['readings_2031_05']);
  expect(await placed(s)).toEqual([
    [far, 'readings_2031_05'],
    [far + 1, 'readings_2031_05'],
  ]);
  expect(await ensureReadingPartitions(s, far, far)).toEqual([]); // made once
  await s.query('DELETE FROM readings WHERE engine_id = 7');
});

pgOnly('PostgreSQL: retention drops whole months that ended before the cutoff, nothing newer, rollups untouched', async () => {
  const s = t.ctx.sequelize;
  const jan = Date.UTC(2020, 0, 10);
  const feb = Date.UTC(2020, 1, 10);
  await ensureReadingPartitions(s, jan, feb);
  await insert(s, [jan, feb]);
  await s.query(
    `INSERT INTO rollups (engine_id, channel, minute, "min", "max", "sum", "count", bad_count) VALUES (7, 1, ${monthStart(jan)}, 80, 80, 80, 1, 0)`,
  );
  // the cutoff falls inside February: January ended before it and goes, February stays whole
  expect(await dropReadingPartitionsBefore(s, Date.UTC(2020, 1, 20))).toEqual(['readings_2020_01']);
  expect(await placed(s)).toEqual([[feb, 'readings_2020_02']]);
  expect(await rows(s, 'SELECT COUNT(*)::int AS n FROM rollups WHERE engine_id = 7')).toEqual([{ n: 1 }]);
  expect((await listReadingPartitions(s)).map((p) => p.name)).toContain(partitionName(Date.now()));
  await s.query('DELETE FROM readings WHERE engine_id = 7');
});

pgOnly('PostgreSQL: migration 0013 carries every stored reading into its month, keeps the unique key', async () => {
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'jw-m13-'));
  const db = await createTestDatabase(dataDir);
  const s = createSequelize(loadConfig({ DATA_DIR: dataDir, DATABASE_URL: db.url, LOG_LEVEL: 'error' }), createLogger('error'));
  try {
    await createMigrator(s).up({ to: '0009-coolant-chemistry' });
    const stored = [Date.UTC(2024, 2, 31, 23, 59, 59, 999), Date.UTC(2024, 3, 1), Date.now()];
    await insert(s, stored);
    await createMigrator(s).up();
    expect(await isPartitioned(s)).toBe(true);
    expect(await placed(s)).toEqual([
      [stored[0], 'readings_2024_03'],
      [stored[1], 'readings_2024_04'],
      [stored[2], partitionName(stored[2])],
    ]);
    const [again] = await insert(s, [stored[1]]);
    expect(again).toEqual([]);
    expect(await rows(s, `SELECT to_regclass('readings_unpartitioned') AS t`)).toEqual([{ t: null }]);
  } finally {
    await s.close();
    await db.drop();
    fs.rmSync(dataDir, { recursive: true, force: true });
  }
});
