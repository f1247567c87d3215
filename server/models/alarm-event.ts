import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** One entry of an alarm's history: a state transition, a note, an e-mail sent, an escalation. */
export class AlarmEvent extends Model<InferAttributes<AlarmEvent>, InferCreationAttributes<AlarmEvent>> {
  declare id: CreationOptional<number>;
  declare alarmId: number;
  declare at: Date;
  declare event: string;
  declare fromState: string | null;
  declare toState: string | null;
  declare userId: number | null;
  declare value: number | null;
  declare note: string | null;
}

export function initAlarmEvent(sequelize: Sequelize): typeof AlarmEvent {
  return AlarmEvent.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      alarmId: { type: DataTypes.INTEGER, allowNull: false },
      at: { type: DataTypes.DATE, allowNull: false },
      event: { type: DataTypes.STRING(32), allowNull: false },
      fromState: { type: DataTypes.STRING(32), allowNull: true },
      toState: { type: DataTypes.STRING(32), allowNull: true },
      userId: { type: DataTypes.INTEGER, allowNull: true },
      value: { type: DataTypes.DOUBLE, allowNull: true },
      note: { type: DataTypes.STRING(1000), allowNull: true },
    },
    { sequelize, tableName: 'alarm_events', underscored: true, timestamps: false },
  );
}
