import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** An administrator's override of one profile rule for one engine: other parameters, or switched off. */
export class EngineRule extends Model<InferAttributes<EngineRule>, InferCreationAttributes<EngineRule>> {
  declare id: CreationOptional<number>;
  declare engineId: number;
  declare rule: string;
  declare params: Record<string, unknown> | null;
  declare enabled: CreationOptional<boolean>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initEngineRule(sequelize: Sequelize): typeof EngineRule {
  return EngineRule.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      engineId: { type: DataTypes.INTEGER, allowNull: false },
      rule: { type: DataTypes.STRING(40), allowNull: false },
      params: { type: DataTypes.JSON, allowNull: true },
      enabled: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'engine_rules', underscored: true },
  );
}
