import { QueryTypes } from 'sequelize';
import type { MigrationContext } from '../migrate';
import { DEFAULT_PARTITION, ensureReadingPartitions, MONTHS_AHEAD, nextMonth } from '../reading-partitions';

/**
 * PostgreSQL: `readings` becomes a table partitioned by month of ts (see ../reading-partitions.ts), so
 * retention drops whole months. The rows move over in one transaction, the unique key (engine_id, channel, ts)
 * stays (it holds the partition key, so ON CONFLICT works as before). SQLite: nothing changes.
 */
export async function up({ sequelize }: MigrationContext): Promise<void> {
  if (sequelize.getDialect() !== 'postgres') return;
  await sequelize.transaction(async (transaction) => {
    const q = (sql: string) => sequelize.query(sql, { transaction, logging: false });
    await q('ALTER TABLE readings RENAME TO readings_unpartitioned');
    await q('ALTER INDEX readings_engine_channel_ts RENAME TO readings_unpartitioned_key');
    await q(`CREATE TABLE readings (
      engine_id INTEGER NOT NULL, channel INTEGER NOT NULL, ts BIGINT NOT NULL,
      value DOUBLE PRECISION NOT NULL, quality INTEGER NOT NULL DEFAULT 0
    ) PARTITION BY RANGE (ts)`);
    await q('CREATE UNIQUE INDEX readings_engine_channel_ts ON readings (engine_id, channel, ts)');
    await q(`CREATE TABLE ${DEFAULT_PARTITION} PARTITION OF readings DEFAULT`);
    // a partition for each month that holds readings, and for this month and the coming ones
    const months = await sequelize.query<{ m: string }>(
      `SELECT DISTINCT (EXTRACT(EPOCH FROM date_trunc('month', to_timestamp(ts / 1000.0) AT TIME ZONE 'UTC')) * 1000)::bigint AS m
         FROM readings_unpartitioned`,
      { type: QueryTypes.SELECT, transaction, logging: false },
    );
    for (const { m } of months) await ensureReadingPartitions(sequelize, Number(m), Number(m), transaction);
    let ahead = Date.now();
    for (let i = 0; i < MONTHS_AHEAD; i++) ahead = nextMonth(ahead);
    await ensureReadingPartitions(sequelize, Date.now(), ahead, transaction);
    await q(`INSERT INTO readings (engine_id, channel, ts, value, quality)
      SELECT engine_id, channel, ts, value, quality FROM readings_unpartitioned`);
    await q('DROP TABLE readings_unpartitioned');
  });
}

export async function down({ sequelize }: MigrationContext): Promise<void> {
  if (sequelize.getDialect() !== 'postgres') return;
  await sequelize.transaction(async (transaction) => {
    const q = (sql: string) => sequelize.query(sql, { transaction, logging: false });
    await q('CREATE TABLE readings_plain (LIKE readings INCLUDING DEFAULTS)');
    await q('INSERT INTO readings_plain SELECT engine_id, channel, ts, value, quality FROM readings');
    await q('DROP TABLE readings');
    await q('ALTER TABLE readings_plain RENAME TO readings');
    await q('CREATE UNIQUE INDEX readings_engine_channel_ts ON readings (engine_id, channel, ts)');
  });
}
