import { QueryTypes, type Sequelize } from 'sequelize';
import type { MetricMap } from '../../../shared/sparkplug/channels';
import type { NodeRecord } from './host';

const NODE_RECORDS_SQL = `SELECT id, engine_id AS "engineId", sparkplug_device_id AS "deviceId", sparkplug_metric_map AS "metricMap"
FROM devices WHERE sparkplug_group_id = $1 AND sparkplug_edge_node_id = $2 AND revoked_at IS NULL`;

/** The live device records of one edge node, with their metric maps (read at each birth). */
export async function readNodeRecords(sequelize: Sequelize, groupId: string, edgeNodeId: string): Promise<NodeRecord[]> {
  const rows = await sequelize.query<{ id: number; engineId: number; deviceId: string | null; metricMap: string | null }>(NODE_RECORDS_SQL, {
    bind: [groupId, edgeNodeId],
    type: QueryTypes.SELECT,
    logging: false,
  });
  return rows.map((r) => ({
    recordId: Number(r.id),
    engineId: Number(r.engineId),
    sparkplugDeviceId: r.deviceId ?? null,
    metricMap: r.metricMap ? (JSON.parse(r.metricMap) as MetricMap) : null,
  }));
}

/** Every edge node with a live device record: the nodes a new Sparkplug host asks to rebirth. */
export async function readSparkplugNodes(sequelize: Sequelize): Promise<Array<{ groupId: string; edgeNodeId: string }>> {
  const rows = await sequelize.query<{ groupId: string; edgeNodeId: string }>(
    `SELECT DISTINCT sparkplug_group_id AS "groupId", sparkplug_edge_node_id AS "edgeNodeId" FROM devices
      WHERE sparkplug_group_id IS NOT NULL AND sparkplug_edge_node_id IS NOT NULL AND revoked_at IS NULL`,
    { type: QueryTypes.SELECT, logging: false },
  );
  return rows;
}
