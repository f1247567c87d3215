import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** The MQTT identity of one engine's gateway. Only a bcrypt hash of the secret is kept. */
export class Device extends Model<InferAttributes<Device>, InferCreationAttributes<Device>> {
  declare id: CreationOptional<number>;
  declare engineId: number;
  declare username: string;
  declare secretHash: string;
  declare revokedAt: CreationOptional<Date | null>;
  declare lastSeenAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  override toJSON(): Omit<InferAttributes<Device>, 'secretHash'> {
    const { secretHash: _hash, ...rest } = this.get({ plain: true });
    return rest;
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
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'devices', underscored: true },
  );
}
