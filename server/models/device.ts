import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

type SparkplugColumns = 'sparkplugGroupId' | 'sparkplugEdgeNodeId' | 'sparkplugDeviceId' | 'sparkplugMetricMap';
export interface DeviceSparkplugView {
  sparkplug: { groupId: string; edgeNodeId: string; deviceId: string | null } | null;
  metricMap: Record<string, unknown> | null;
}

/** The MQTT identity of one engine's gateway. Only a bcrypt hash of the secret is kept. */
export class Device extends Model<InferAttributes<Device>, InferCreationAttributes<Device>> {
  declare id: CreationOptional<number>;
  declare engineId: number;
  declare username: string;
  declare secretHash: string;
  declare revokedAt: CreationOptional<Date | null>;
  declare lastSeenAt: CreationOptional<Date | null>;
  /** Sparkplug B identity (migration 0012); null for a device that speaks our JSON topics only. */
  declare sparkplugGroupId: CreationOptional<string | null>;
  declare sparkplugEdgeNodeId: CreationOptional<string | null>;
  declare sparkplugDeviceId: CreationOptional<string | null>;
  /** JSON text of the metric-name mapping (shared/sparkplug/channels.ts MetricMap). */
  declare sparkplugMetricMap: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  override toJSON(): Omit<InferAttributes<Device>, 'secretHash' | SparkplugColumns> & DeviceSparkplugView {
    const { sparkplugGroupId, sparkplugEdgeNodeId, sparkplugDeviceId, sparkplugMetricMap, ...plain } = this.get({ plain: true });
    const rest: Partial<typeof plain> = plain;
    delete rest.secretHash;
    const sparkplug =
      sparkplugGroupId && sparkplugEdgeNodeId ? { groupId: sparkplugGroupId, edgeNodeId: sparkplugEdgeNodeId, deviceId: sparkplugDeviceId ?? null } : null;
    return {
      ...(rest as Omit<typeof plain, 'secretHash'>),
      sparkplug,
      metricMap: sparkplugMetricMap ? (JSON.parse(sparkplugMetricMap) as Record<string, unknown>) : null,
    };
  }
}

export function initDevice(sequelize: Sequelize): typeof Device {
  return Device.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      engineId: { type: DataTypes.INTEGER, allowNull: false },
      username: { type: DataTypes.STRING(64), allowNull: false, unique: true },
      secretHash: { type: DataTypes.STRING(100), allowNull: false },
      revokedAt: { type: DataTypes.DATE, allowNull: true },
      lastSeenAt: { type: DataTypes.DATE, allowNull: true },
      sparkplugGroupId: { type: DataTypes.STRING(64), allowNull: true },
      sparkplugEdgeNodeId: { type: DataTypes.STRING(64), allowNull: true },
      sparkplugDeviceId: { type: DataTypes.STRING(64), allowNull: true },
      sparkplugMetricMap: { type: DataTypes.TEXT, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'devices', underscored: true },
  );
}
