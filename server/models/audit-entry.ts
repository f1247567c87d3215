import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** Who did what, when: safety overrides, sign-offs and other acts that must be traceable. */
export class AuditEntry extends Model<InferAttributes<AuditEntry>, InferCreationAttributes<AuditEntry>> {
  declare id: CreationOptional<number>;
  declare at: Date;
  declare userId: number | null;
  declare action: string;
  declare entity: string;
  declare entityId: number | null;
  declare details: Record<string, unknown> | null;
}

export function initAuditEntry(sequelize: Sequelize): typeof AuditEntry {
  return AuditEntry.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      at: { type: DataTypes.DATE, allowNull: false },
      userId: { type: DataTypes.INTEGER, allowNull: true },
      action: { type: DataTypes.STRING(40), allowNull: false },
      entity: { type: DataTypes.STRING(40), allowNull: false },
      entityId: { type: DataTypes.INTEGER, allowNull: true },
      details: { type: DataTypes.JSON, allowNull: true },
    },
    { sequelize, tableName: 'audit_log', underscored: true, timestamps: false },
  );
}
