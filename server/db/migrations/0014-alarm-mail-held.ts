import { DataTypes } from 'sequelize';
import type { MigrationContext } from '../migrate';

/**
 * Alarms raised from late data (backfill, store-and-forward) hold their e-mail until the engine's data has caught
 * up: `mail_held_since` is when that data arrived (null = nothing held). Kept in the database so a held e-mail
 * survives a restart. Portable queryInterface calls only.
 */
export async function up({ queryInterface: q }: MigrationContext): Promise<void> {
  await q.addColumn('alarms', 'mail_held_since', { type: DataTypes.DATE, allowNull: true });
}

export async function down({ queryInterface: q }: MigrationContext): Promise<void> {
  await q.removeColumn('alarms', 'mail_held_since');
}
