import { DataTypes } from 'sequelize';
import type { MigrationContext } from '../migrate';

/**
 * A device record may carry a Sparkplug B identity (group id, edge node id, and a device id when the
 * engine is a device under an edge node) and a metric-name mapping (JSON text). Portable calls only.
 */
export async function up({ queryInterface: q }: MigrationContext): Promise<void> {
  await q.addColumn('devices', 'sparkplug_group_id', { type: DataTypes.STRING(64), allowNull: true });
  await q.addColumn('devices', 'sparkplug_edge_node_id', { type: DataTypes.STRING(64), allowNull: true });
  await q.addColumn('devices', 'sparkplug_device_id', { type: DataTypes.STRING(64), allowNull: true });
  await q.addColumn('devices', 'sparkplug_metric_map', { type: DataTypes.TEXT, allowNull: true });
  await q.addIndex('devices', ['sparkplug_group_id', 'sparkplug_edge_node_id'], { name: 'devices_sparkplug_node' });
}

export async function down({ queryInterface: q }: MigrationContext): Promise<void> {
  await q.removeIndex('devices', 'devices_sparkplug_node');
  await q.removeColumn('devices', 'sparkplug_metric_map');
  await q.removeColumn('devices', 'sparkplug_device_id');
  await q.removeColumn('devices', 'sparkplug_edge_node_id');
  await q.removeColumn('devices', 'sparkplug_group_id');
}
