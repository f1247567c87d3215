import { DataTypes, Model, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** Running count of rejected payloads per device and reason (written by the telemetry ingest). */
export class DeviceRejection extends Model<InferAttributes<DeviceRejection>, InferCreationAttributes<DeviceRejection>> {
  declare deviceId: number;
  declare reason: string;
  declare count: number;
  declare lastAt: Date | null;
  declare lastDetail: string | null;
}

export function initDeviceRejection(sequelize: Sequelize): typeof DeviceRejection {
  return DeviceRejection.init(
    {
      deviceId: { type: DataTypes.INTEGER, allowNull: false, primaryKey: true },
      reason: { type: DataTypes.STRING(32), allowNull: false, primaryKey: true },
      count: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      lastAt: { type: DataTypes.DATE, allowNull: true },
      lastDetail: { type: DataTypes.STRING(500), allowNull: true },
    },
    { sequelize, tableName: 'device_rejections', underscored: true, timestamps: false },
  );
}
