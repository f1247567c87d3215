import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export const TEST_METHODS = ['strip', 'refractometer', 'lab'] as const;
export type TestMethod = (typeof TEST_METHODS)[number];
export const TEST_SOURCES = ['manual', 'lab-import'] as const;

/** One coolant test of an engine, with the decision computed when it was recorded. */
export class CoolantTest extends Model<InferAttributes<CoolantTest>, InferCreationAttributes<CoolantTest>> {
  declare id: CreationOptional<number>;
  declare engineId: number;
  declare testedAt: Date;
  declare method: TestMethod;
  declare scaUnitsPerGal: number | null;
  declare glycolPercent: number | null;
  declare freezePointC: number | null;
  declare ph: number | null;
  declare conductivityUsCm: number | null;
  declare nitritePpm: CreationOptional<number | null>;
  declare molybdatePpm: CreationOptional<number | null>;
  declare reserveAlkalinityMl: CreationOptional<number | null>;
  /** Signs of glycol breakdown looked for (migration 0016): null = not looked at. */
  declare breakdownSigns: CreationOptional<string[] | null>;
  declare appearance: string | null;
  declare notes: string | null;
  declare testedBy: number | null;
  declare decision: Record<string, unknown> | null;
  declare source: (typeof TEST_SOURCES)[number];
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export interface FilterSize {
  label: string;
  prechargeUnits: number;
}

/** Strength of the liquid additive in use and the pre-charge of the charged filter sizes (no brand names). */
export class AdditiveProfile extends Model<InferAttributes<AdditiveProfile>, InferCreationAttributes<AdditiveProfile>> {
  declare id: CreationOptional<number>;
  declare name: string;
  declare liquidUnitsPerLitre: number;
  declare filterSizes: FilterSize[];
  declare scaLow: CreationOptional<number>;
  declare scaHigh: CreationOptional<number>;
  declare updatedBy: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

/** A per-engine change to one task of the default service plan. */
export class ServiceTaskOverride extends Model<InferAttributes<ServiceTaskOverride>, InferCreationAttributes<ServiceTaskOverride>> {
  declare id: CreationOptional<number>;
  declare engineId: number;
  declare taskKey: string;
  declare title: string | null;
  declare everyHours: number | null;
  declare everyDays: number | null;
  declare disabled: CreationOptional<boolean>;
  declare updatedBy: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

/** Audit of a hand correction of an engine's run hours from its hour meter. */
export class RunHoursAdjustment extends Model<InferAttributes<RunHoursAdjustment>, InferCreationAttributes<RunHoursAdjustment>> {
  declare id: CreationOptional<number>;
  declare engineId: number;
  declare oldRunHours: number;
  declare newRunHours: number;
  declare userId: number | null;
  declare reason: string;
  declare at: Date;
}

/** The admin's coolant chemistry limits (one row; missing keys take the shared defaults). */
export class CoolantSettings extends Model<InferAttributes<CoolantSettings>, InferCreationAttributes<CoolantSettings>> {
  declare id: CreationOptional<number>;
  declare chemistryLimits: Record<string, number>;
  declare extenderInterval: CreationOptional<{ everyHours: number | null; everyDays: number | null } | null>;
  declare updatedBy: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export const TOP_UP_LIQUIDS = ['water', 'premix', 'glycol'] as const;
export type TopUpLiquid = (typeof TOP_UP_LIQUIDS)[number];

/** Coolant added to an engine between tests (it dilutes the additive). */
export class CoolantTopUp extends Model<InferAttributes<CoolantTopUp>, InferCreationAttributes<CoolantTopUp>> {
  declare id: CreationOptional<number>;
  declare engineId: number;
  declare addedAt: Date;
  declare volumeL: number;
  declare liquid: TopUpLiquid;
  declare premixPercent: number | null;
  declare notes: string | null;
  declare addedBy: number | null;
  declare workOrderId: CreationOptional<number | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export interface CoolantModels {
  CoolantTest: typeof CoolantTest;
  AdditiveProfile: typeof AdditiveProfile;
  ServiceTaskOverride: typeof ServiceTaskOverride;
  RunHoursAdjustment: typeof RunHoursAdjustment;
  CoolantSettings: typeof CoolantSettings;
  CoolantTopUp: typeof CoolantTopUp;
}

// a fresh object per attribute: Sequelize writes the column name into it
const real = () => ({ type: DataTypes.DOUBLE, allowNull: true });

/** Models of the coolant issue (migration 0004). */
export function initCoolantModels(sequelize: Sequelize): CoolantModels {
  CoolantTest.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      engineId: { type: DataTypes.INTEGER, allowNull: false },
      testedAt: { type: DataTypes.DATE, allowNull: false },
      method: { type: DataTypes.STRING(16), allowNull: false },
      scaUnitsPerGal: real(),
      glycolPercent: real(),
      freezePointC: real(),
      ph: real(),
      conductivityUsCm: real(),
      nitritePpm: real(),
      molybdatePpm: real(),
      reserveAlkalinityMl: real(),
      breakdownSigns: { type: DataTypes.JSON, allowNull: true },
      appearance: { type: DataTypes.STRING(200), allowNull: true },
      notes: { type: DataTypes.TEXT, allowNull: true },
      testedBy: { type: DataTypes.INTEGER, allowNull: true },
      decision: { type: DataTypes.JSON, allowNull: true },
      source: { type: DataTypes.STRING(16), allowNull: false, defaultValue: 'manual' },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'coolant_tests', underscored: true },
  );
  AdditiveProfile.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      name: { type: DataTypes.STRING(80), allowNull: false },
      liquidUnitsPerLitre: { type: DataTypes.DOUBLE, allowNull: false },
      filterSizes: { type: DataTypes.JSON, allowNull: false },
      scaLow: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 1.2 },
      scaHigh: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 3.0 },
      updatedBy: { type: DataTypes.INTEGER, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'additive_profiles', underscored: true },
  );
  ServiceTaskOverride.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      engineId: { type: DataTypes.INTEGER, allowNull: false },
      taskKey: { type: DataTypes.STRING(40), allowNull: false },
      title: { type: DataTypes.STRING(200), allowNull: true },
      everyHours: real(),
      everyDays: real(),
      disabled: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      updatedBy: { type: DataTypes.INTEGER, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'service_tasks', underscored: true },
  );
  RunHoursAdjustment.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      engineId: { type: DataTypes.INTEGER, allowNull: false },
      oldRunHours: { type: DataTypes.DOUBLE, allowNull: false },
      newRunHours: { type: DataTypes.DOUBLE, allowNull: false },
      userId: { type: DataTypes.INTEGER, allowNull: true },
      reason: { type: DataTypes.STRING(500), allowNull: false },
      at: { type: DataTypes.DATE, allowNull: false },
    },
    { sequelize, tableName: 'run_hours_adjustments', underscored: true, timestamps: false },
  );
  CoolantSettings.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      chemistryLimits: { type: DataTypes.JSON, allowNull: false },
      extenderInterval: { type: DataTypes.JSON, allowNull: true },
      updatedBy: { type: DataTypes.INTEGER, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'coolant_settings', underscored: true },
  );
  CoolantTopUp.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      engineId: { type: DataTypes.INTEGER, allowNull: false },
      addedAt: { type: DataTypes.DATE, allowNull: false },
      volumeL: { type: DataTypes.DOUBLE, allowNull: false },
      liquid: { type: DataTypes.STRING(16), allowNull: false },
      premixPercent: real(),
      notes: { type: DataTypes.STRING(500), allowNull: true },
      addedBy: { type: DataTypes.INTEGER, allowNull: true },
      workOrderId: { type: DataTypes.INTEGER, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'coolant_top_ups', underscored: true },
  );
  return { CoolantTest, AdditiveProfile, ServiceTaskOverride, RunHoursAdjustment, CoolantSettings, CoolantTopUp };
}
