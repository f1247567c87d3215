import type { MigrationContext } from '../migrate';

/**
 * A reading is identified by (engine_id, channel, ts): the index on those columns becomes UNIQUE, so the
 * writer's INSERT ... ON CONFLICT DO NOTHING stores a redelivered reading once.
 * Before that, readings stored twice are removed (the first stored copy is kept) and the rollups of the
 * minutes they touched are recomputed from the raw readings left. One transaction: all or nothing.
 */
export async function up({ sequelize }: MigrationContext): Promise<void> {
  const postgres = sequelize.getDialect() === 'postgres';
  await sequelize.transaction(async (transaction) => {
    const q = (sql: string) => sequelize.query(sql, { transaction, logging: false });
    // the (engine, channel, minute) keys that hold a duplicate
    await q(`CREATE TABLE readings_dup_minutes AS
      SELECT DISTINCT engine_id, channel, ts - (ts % 60000) AS minute
      FROM readings GROUP BY engine_id, channel, ts HAVING COUNT(*) > 1`);
    // keep the first stored copy (lowest rowid / ctid); the index serves the lookup
    await q(
      postgres
        ? `DELETE FROM readings a USING readings b
         WHERE a.engine_id = b.engine_id AND a.channel = b.channel AND a.ts = b.ts AND a.ctid > b.ctid`
        : `DELETE FROM readings WHERE EXISTS (SELECT 1 FROM readings b
         WHERE b.engine_id = readings.engine_id AND b.channel = readings.channel AND b.ts = readings.ts AND b.rowid < readings.rowid)`,
    );
    const touched = `EXISTS (SELECT 1 FROM readings_dup_minutes d
      WHERE d.engine_id = %T.engine_id AND d.channel = %T.channel AND d.minute = %M)`;
    await q(`DELETE FROM rollups WHERE ${touched.replace(/%T/g, 'rollups').replace('%M', 'rollups.minute')}`);
    // the same aggregate the writer keeps: min/max/sum/count over good readings, bad ones counted apart
    await q(`INSERT INTO rollups (engine_id, channel, minute, "min", "max", "sum", "count", bad_count)
      SELECT engine_id, channel, ts - (ts % 60000),
        MIN(CASE WHEN quality = 0 THEN value END), MAX(CASE WHEN quality = 0 THEN value END),
        COALESCE(SUM(CASE WHEN quality = 0 THEN value END), 0),
        SUM(CASE WHEN quality = 0 THEN 1 ELSE 0 END), SUM(CASE WHEN quality = 0 THEN 0 ELSE 1 END)
      FROM readings r WHERE ${touched.replace(/%T/g, 'r').replace('%M', 'r.ts - (r.ts % 60000)')}
      GROUP BY engine_id, channel, ts - (ts % 60000)`);
    await q('DROP TABLE readings_dup_minutes');
    await q('DROP INDEX readings_engine_channel_ts');
    await q('CREATE UNIQUE INDEX readings_engine_channel_ts ON readings (engine_id, channel, ts)');
  });
}

export async function down({ sequelize }: MigrationContext): Promise<void> {
  await sequelize.transaction(async (transaction) => {
    await sequelize.query('DROP INDEX readings_engine_channel_ts', { transaction });
    await sequelize.query('CREATE INDEX readings_engine_channel_ts ON readings (engine_id, channel, ts)', { transaction });
  });
}
