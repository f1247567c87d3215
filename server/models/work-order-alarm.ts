import { DataTypes, Model, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** Which alarms a work order answers. */
export class WorkOrderAlarm extends Model<InferAttributes<WorkOrderAlarm>, InferCreationAttributes<WorkOrderAlarm>> {
  declare workOrderId: number;
  declare alarmId: number;
}

export function initWorkOrderAlarm(sequelize: Sequelize): typeof WorkOrderAlarm {
  return WorkOrderAlarm.init(
    {
      workOrderId: { type: DataTypes.INTEGER, allowNull: false, primaryKey: true },
      alarmId: { type: DataTypes.INTEGER, allowNull: false, primaryKey: true },
    },
    { sequelize, tableName: 'work_order_alarms', underscored: true, timestamps: false },
  );
}
