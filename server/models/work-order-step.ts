import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export const STEP_INPUTS = ['value', 'photo', 'confirmation'] as const;
export type StepInput = (typeof STEP_INPUTS)[number];

/** Readings taken by hand when live data was stale or missing (the manual check). */
export interface ManualCheck {
  gaugeKpa: number;
  tempC: number;
  minutesSinceStop: number;
  checkedBy: string;
  reason: string;
}

/** One checklist step of a work order. */
export class WorkOrderStep extends Model<InferAttributes<WorkOrderStep>, InferCreationAttributes<WorkOrderStep>> {
  declare id: CreationOptional<number>;
  declare workOrderId: number;
  declare position: number;
  declare key: string;
  declare title: string;
  declare detail: string | null;
  declare input: StepInput;
  declare unit: string | null;
  declare optional: CreationOptional<boolean>;
  declare gated: CreationOptional<boolean>;
  declare caution: string | null;
  declare resultValue: CreationOptional<number | null>;
  declare resultUnit: CreationOptional<string | null>;
  declare resultText: CreationOptional<string | null>;
  declare lockoutConfirmed: CreationOptional<boolean | null>;
  declare gateSnapshot: CreationOptional<Record<string, unknown> | null>;
  declare manualCheck: CreationOptional<ManualCheck | null>;
  declare doneAt: CreationOptional<Date | null>;
  declare doneBy: CreationOptional<number | null>;
}

export function initWorkOrderStep(sequelize: Sequelize): typeof WorkOrderStep {
  return WorkOrderStep.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      workOrderId: { type: DataTypes.INTEGER, allowNull: false },
      position: { type: DataTypes.INTEGER, allowNull: false },
      key: { type: DataTypes.STRING(40), allowNull: false },
      title: { type: DataTypes.STRING(300), allowNull: false },
      detail: { type: DataTypes.TEXT, allowNull: true },
      input: { type: DataTypes.STRING(16), allowNull: false },
      unit: { type: DataTypes.STRING(16), allowNull: true },
      optional: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      gated: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      caution: { type: DataTypes.TEXT, allowNull: true },
      resultValue: { type: DataTypes.DOUBLE, allowNull: true },
      resultUnit: { type: DataTypes.STRING(16), allowNull: true },
      resultText: { type: DataTypes.STRING(1000), allowNull: true },
      lockoutConfirmed: { type: DataTypes.BOOLEAN, allowNull: true },
      gateSnapshot: { type: DataTypes.JSON, allowNull: true },
      manualCheck: { type: DataTypes.JSON, allowNull: true },
      doneAt: { type: DataTypes.DATE, allowNull: true },
      doneBy: { type: DataTypes.INTEGER, allowNull: true },
    },
    { sequelize, tableName: 'work_order_steps', underscored: true, timestamps: false },
  );
}
