import { DataTypes } from 'sequelize';
import type { MigrationContext } from '../migrate';

/**
 * Sites get an elevation (m above mean sea level; null = unknown, taken as sea level) for the standard-atmosphere
 * pressure used by the boiling-point figures. Alarms get the time they were first found chattering (null = never).
 * Portable queryInterface calls only.
 */
export async function up({ queryInterface: q }: MigrationContext): Promise<void> {
  await q.addColumn('sites', 'elevation_m', { type: DataTypes.DOUBLE, allowNull: true });
  await q.addColumn('alarms', 'chattering_at', { type: DataTypes.DATE, allowNull: true });
}

export async function down({ queryInterface: q }: MigrationContext): Promise<void> {
  await q.removeColumn('alarms', 'chattering_at');
  await q.removeColumn('sites', 'elevation_m');
}
