import { DataTypes, Model, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** The first answer to a write request sent with an Idempotency-Key (migration 0019); statusCode null while it is handled. */
export class IdempotencyKey extends Model<InferAttributes<IdempotencyKey>, InferCreationAttributes<IdempotencyKey>> {
  declare userId: number;
  declare key: string;
  declare method: string;
  declare path: string;
  declare statusCode: number | null;
  declare body: string | null;
  declare createdAt: Date;
}

export function initIdempotencyKey(sequelize: Sequelize): typeof IdempotencyKey {
  return IdempotencyKey.init(
    {
      userId: { type: DataTypes.INTEGER, allowNull: false, primaryKey: true },
      key: { type: DataTypes.STRING(100), allowNull: false, primaryKey: true },
      method: { type: DataTypes.STRING(10), allowNull: false },
      path: { type: DataTypes.STRING(300), allowNull: false },
      statusCode: { type: DataTypes.INTEGER, allowNull: true },
      body: { type: DataTypes.TEXT, allowNull: true },
      createdAt: { type: DataTypes.DATE, allowNull: false },
    },
    { sequelize, tableName: 'idempotency_keys', underscored: true, timestamps: false },
  );
}
