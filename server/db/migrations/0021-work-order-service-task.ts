import { DataTypes } from 'sequelize';
import type { MigrationContext } from '../migrate';

/**
 * The service-plan task a work order was created for (from the due list). A task the engine's plan added has no
 * template of its own and is done as a general repair: completing the order still writes a service event under
 * the task's key, so the due list counts it as done.
 */
export async function up({ queryInterface: q }: MigrationContext): Promise<void> {
  await q.addColumn('work_orders', 'service_task_key', { type: DataTypes.STRING(64), allowNull: true });
}

export async function down({ queryInterface: q }: MigrationContext): Promise<void> {
  await q.removeColumn('work_orders', 'service_task_key');
}
