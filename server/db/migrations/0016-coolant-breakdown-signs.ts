import { DataTypes } from 'sequelize';
import type { MigrationContext } from '../migrate';

/**
 * Signs of glycol breakdown a technician looked for in a coolant sample (JSON list of sign keys from
 * shared/coolant/chemistry.ts; null = not looked at, [] = looked and none seen). Portable queryInterface call.
 */
export async function up({ queryInterface: q }: MigrationContext): Promise<void> {
  await q.addColumn('coolant_tests', 'breakdown_signs', { type: DataTypes.JSON, allowNull: true });
}

export async function down({ queryInterface: q }: MigrationContext): Promise<void> {
  await q.removeColumn('coolant_tests', 'breakdown_signs');
}
