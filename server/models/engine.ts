import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export const DUTIES = ['standby', 'prime', 'continuous'] as const;
export const COOLANT_FAMILIES = ['conventional', 'extended-life'] as const;
export const GLYCOL_TYPES = ['ethylene', 'propylene'] as const;

/** One engine and its cooling system. All quantities in SI: litres, kPa gauge, degC, hours. */
export class Engine extends Model<InferAttributes<Engine>, InferCreationAttributes<Engine>> {
  declare id: CreationOptional<number>;
  declare siteId: number;
  declare name: string;
  declare duty: (typeof DUTIES)[number];
  declare capacityL: number;
  declare coolantFamily: (typeof COOLANT_FAMILIES)[number];
  declare glycolType: (typeof GLYCOL_TYPES)[number];
  declare glycolPercent: number;
  declare capPressureKpa: number;
  declare oilDrainIntervalH: number;
  declare runHours: CreationOptional<number>;
  declare safeOpenTempC: CreationOptional<number>;
  declare heaterSetpointC: CreationOptional<number | null>;
  declare outOfService: CreationOptional<boolean>;
  declare retiredAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initEngine(sequelize: Sequelize): typeof Engine {
  const num = (allowNull = false) => ({ type: DataTypes.DOUBLE, allowNull });
  return Engine.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      siteId: { type: DataTypes.INTEGER, allowNull: false },
      name: { type: DataTypes.STRING(120), allowNull: false },
      duty: { type: DataTypes.STRING(16), allowNull: false },
      capacityL: num(),
      coolantFamily: { type: DataTypes.STRING(16), allowNull: false },
      glycolType: { type: DataTypes.STRING(16), allowNull: false },
      glycolPercent: num(),
      capPressureKpa: num(),
      oilDrainIntervalH: num(),
      runHours: { ...num(), defaultValue: 0 },
      safeOpenTempC: { ...num(), defaultValue: 50 },
      heaterSetpointC: num(true),
      outOfService: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      retiredAt: { type: DataTypes.DATE, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'engines', underscored: true },
  );
}
