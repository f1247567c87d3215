import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** The reference value of a channel for one engine (conductivity of fresh coolant), valid from baseline_from. */
export class EngineBaseline extends Model<InferAttributes<EngineBaseline>, InferCreationAttributes<EngineBaseline>> {
  declare id: CreationOptional<number>;
  declare engineId: number;
  declare channel: CreationOptional<string>;
  declare baselineFrom: Date;
  declare value: number;
  declare createdAt: CreationOptional<Date>;
}

export function initEngineBaseline(sequelize: Sequelize): typeof EngineBaseline {
  return EngineBaseline.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      engineId: { type: DataTypes.INTEGER, allowNull: false },
      channel: { type: DataTypes.STRING(32), allowNull: false, defaultValue: 'coolant_conductivity' },
      baselineFrom: { type: DataTypes.DATE, allowNull: false },
      value: { type: DataTypes.DOUBLE, allowNull: false },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'engine_baselines', underscored: true, updatedAt: false },
  );
}
