import { DataTypes } from 'sequelize';
import type { MigrationContext } from '../migrate';

/**
 * The coolant test a work order recorded (at most one per order; undone only by an amendment).
 * Step drafts need no new column: a step's result fields hold the entry as typed until it is done.
 */
export async function up({ queryInterface: q }: MigrationContext): Promise<void> {
  await q.addColumn('work_orders', 'coolant_test_id', {
    type: DataTypes.INTEGER,
    allowNull: true,
    references: { model: 'coolant_tests', key: 'id' },
    onDelete: 'SET NULL',
  });
}

export async function down({ queryInterface: q }: MigrationContext): Promise<void> {
  await q.removeColumn('work_orders', 'coolant_test_id');
}
