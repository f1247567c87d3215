import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export const WORK_STATUSES = ['requested', 'planned', 'in-progress', 'waiting-sign-off', 'closed', 'cancelled'] as const;
export type WorkStatus = (typeof WORK_STATUSES)[number];
export const WORK_PRIORITIES = ['low', 'medium', 'high', 'urgent'] as const;
export type WorkPriority = (typeof WORK_PRIORITIES)[number];

/** One piece of service work on one engine, with a checklist of steps. */
export class WorkOrder extends Model<InferAttributes<WorkOrder>, InferCreationAttributes<WorkOrder>> {
  declare id: CreationOptional<number>;
  declare engineId: number;
  declare kind: string;
  declare title: string;
  declare description: string | null;
  declare priority: WorkPriority;
  /** Calendar date (YYYY-MM-DD) in the site's time zone. */
  declare dueDate: string | null;
  declare assigneeId: number | null;
  declare status: WorkStatus;
  declare createdBy: number;
  declare requestedBy: number | null;
  declare startedAt: CreationOptional<Date | null>;
  declare completedAt: CreationOptional<Date | null>;
  declare signedOffBy: CreationOptional<number | null>;
  declare signedOffAt: CreationOptional<Date | null>;
  declare closedAt: CreationOptional<Date | null>;
  /** The coolant test recorded from this order (once per order). */
  declare coolantTestId: CreationOptional<number | null>;
  /** The service-plan task this order was created for (due list), if any: completing it records that task done. */
  declare serviceTaskKey: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initWorkOrder(sequelize: Sequelize): typeof WorkOrder {
  // a fresh object per attribute: Sequelize writes the column name into it
  const date = () => ({ type: DataTypes.DATE, allowNull: true });
  return WorkOrder.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      engineId: { type: DataTypes.INTEGER, allowNull: false },
      kind: { type: DataTypes.STRING(32), allowNull: false },
      title: { type: DataTypes.STRING(200), allowNull: false },
      description: { type: DataTypes.TEXT, allowNull: true },
      priority: { type: DataTypes.STRING(8), allowNull: false, defaultValue: 'medium' },
      dueDate: { type: DataTypes.DATEONLY, allowNull: true },
      assigneeId: { type: DataTypes.INTEGER, allowNull: true },
      status: { type: DataTypes.STRING(20), allowNull: false },
      createdBy: { type: DataTypes.INTEGER, allowNull: false },
      requestedBy: { type: DataTypes.INTEGER, allowNull: true },
      startedAt: date(),
      completedAt: date(),
      signedOffBy: { type: DataTypes.INTEGER, allowNull: true },
      signedOffAt: date(),
      closedAt: date(),
      coolantTestId: { type: DataTypes.INTEGER, allowNull: true },
      serviceTaskKey: { type: DataTypes.STRING(64), allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'work_orders', underscored: true },
  );
}
