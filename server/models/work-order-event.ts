import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** One entry of a work order's history: every transition, step, part, attachment and amendment. */
export class WorkOrderEvent extends Model<InferAttributes<WorkOrderEvent>, InferCreationAttributes<WorkOrderEvent>> {
  declare id: CreationOptional<number>;
  declare workOrderId: number;
  declare at: Date;
  declare userId: number | null;
  declare event: string;
  declare fromStatus: CreationOptional<string | null>;
  declare toStatus: CreationOptional<string | null>;
  declare note: CreationOptional<string | null>;
  declare details: Record<string, unknown> | null;
}

export function initWorkOrderEvent(sequelize: Sequelize): typeof WorkOrderEvent {
  return WorkOrderEvent.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      workOrderId: { type: DataTypes.INTEGER, allowNull: false },
      at: { type: DataTypes.DATE, allowNull: false },
      userId: { type: DataTypes.INTEGER, allowNull: true },
      event: { type: DataTypes.STRING(32), allowNull: false },
      fromStatus: { type: DataTypes.STRING(20), allowNull: true },
      toStatus: { type: DataTypes.STRING(20), allowNull: true },
      note: { type: DataTypes.STRING(2000), allowNull: true },
      details: { type: DataTypes.JSON, allowNull: true },
    },
    { sequelize, tableName: 'work_order_events', underscored: true, timestamps: false },
  );
}
