import { DataTypes } from 'sequelize';
import type { MigrationContext } from '../migrate';

/**
 * Idempotency keys of write requests (the offline queue of the technician's app sends each queued
 * change with one): the answer given the first time, replayed for a retry, so a change lost in
 * transit and sent again is stored once. Portable calls only.
 */
export async function up({ queryInterface: q }: MigrationContext): Promise<void> {
  await q.createTable('idempotency_keys', {
    user_id: { type: DataTypes.INTEGER, allowNull: false, primaryKey: true },
    key: { type: DataTypes.STRING(100), allowNull: false, primaryKey: true },
    method: { type: DataTypes.STRING(10), allowNull: false },
    path: { type: DataTypes.STRING(300), allowNull: false },
    status_code: { type: DataTypes.INTEGER, allowNull: true },
    body: { type: DataTypes.TEXT, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.addIndex('idempotency_keys', ['created_at'], { name: 'idempotency_keys_created' });
}

export async function down({ queryInterface: q }: MigrationContext): Promise<void> {
  await q.dropTable('idempotency_keys');
}
