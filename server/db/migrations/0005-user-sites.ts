import { DataTypes } from 'sequelize';
import type { MigrationContext } from '../migrate';

/**
 * Which sites a user may see. No rows for a user: every site (so existing set-ups keep working);
 * admins see every site whatever the rows say. Portable queryInterface calls only.
 */
export async function up({ queryInterface: q }: MigrationContext): Promise<void> {
  await q.createTable('user_sites', {
    user_id: { type: DataTypes.INTEGER, allowNull: false, primaryKey: true, references: { model: 'users', key: 'id' }, onDelete: 'CASCADE' },
    site_id: { type: DataTypes.INTEGER, allowNull: false, primaryKey: true, references: { model: 'sites', key: 'id' }, onDelete: 'CASCADE' },
  });
  await q.addIndex('user_sites', ['site_id'], { name: 'user_sites_site' });
}

export async function down({ queryInterface: q }: MigrationContext): Promise<void> {
  await q.dropTable('user_sites');
}
