import { DataTypes } from 'sequelize';
import type { MigrationContext } from '../migrate';

/**
 * users.session_version: signed into every token; raised when a user is disabled or their role,
 * sites or password change, which ends every session signed before.
 */
export async function up({ queryInterface: q }: MigrationContext): Promise<void> {
  await q.addColumn('users', 'session_version', { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 });
}

export async function down({ queryInterface: q }: MigrationContext): Promise<void> {
  await q.removeColumn('users', 'session_version');
}
