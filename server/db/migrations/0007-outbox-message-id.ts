import { DataTypes } from 'sequelize';
import type { MigrationContext } from '../migrate';

/**
 * The outbox keeps one Message-ID per message, generated once and sent with every retry,
 * so a relay that received a message twice (its answer was lost) can drop the copy.
 * Rows queued before this migration get theirs on their next attempt.
 */
export async function up({ queryInterface: q }: MigrationContext): Promise<void> {
  await q.addColumn('outbox', 'message_id', { type: DataTypes.STRING(300), allowNull: true });
}

export async function down({ queryInterface: q }: MigrationContext): Promise<void> {
  await q.removeColumn('outbox', 'message_id');
}
