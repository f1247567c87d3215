import { DataTypes } from 'sequelize';
import type { MigrationContext } from '../migrate';

/**
 * Per-hour rollups beside the per-minute ones, for long trend ranges (a 30-day chart reads 720 rows per
 * channel instead of 43,200). Same columns and meaning as `rollups` (min/max/sum/count of good readings,
 * bad ones counted apart), keyed by the hour's first millisecond. The writer keeps both in the same
 * transaction as the readings; here they are filled once from the per-minute rollups already stored.
 */
export async function up({ sequelize, queryInterface: q }: MigrationContext): Promise<void> {
  await sequelize.transaction(async (transaction) => {
    await q.createTable(
      'rollups_hourly',
      {
        engine_id: { type: DataTypes.INTEGER, allowNull: false, primaryKey: true },
        channel: { type: DataTypes.INTEGER, allowNull: false, primaryKey: true },
        hour: { type: DataTypes.BIGINT, allowNull: false, primaryKey: true },
        min: { type: DataTypes.DOUBLE, allowNull: true },
        max: { type: DataTypes.DOUBLE, allowNull: true },
        sum: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
        count: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        bad_count: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      },
      { transaction },
    );
    await sequelize.query(
      `INSERT INTO rollups_hourly (engine_id, channel, hour, "min", "max", "sum", "count", bad_count)
      SELECT engine_id, channel, minute - (minute % 3600000), MIN("min"), MAX("max"), SUM("sum"), SUM("count"), SUM(bad_count)
      FROM rollups GROUP BY engine_id, channel, minute - (minute % 3600000)`,
      { transaction, logging: false },
    );
  });
}

export async function down({ queryInterface: q }: MigrationContext): Promise<void> {
  await q.dropTable('rollups_hourly');
}
