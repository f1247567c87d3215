import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** A recurring service task done on an engine (e.g. coolant filter change), for the service plan. */
export class ServiceEvent extends Model<InferAttributes<ServiceEvent>, InferCreationAttributes<ServiceEvent>> {
  declare id: CreationOptional<number>;
  declare engineId: number;
  declare taskKey: string;
  declare doneAt: Date;
  declare runHours: number | null;
  declare workOrderId: number | null;
  declare createdAt: CreationOptional<Date>;
}

export function initServiceEvent(sequelize: Sequelize): typeof ServiceEvent {
  return ServiceEvent.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      engineId: { type: DataTypes.INTEGER, allowNull: false },
      taskKey: { type: DataTypes.STRING(40), allowNull: false },
      doneAt: { type: DataTypes.DATE, allowNull: false },
      runHours: { type: DataTypes.DOUBLE, allowNull: true },
      workOrderId: { type: DataTypes.INTEGER, allowNull: true },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'service_events', underscored: true, updatedAt: false },
  );
}
