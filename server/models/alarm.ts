import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { AlarmPriority } from '../services/alarms/priority';

/** One alarm of one rule on one engine, from raise until it is closed (returned to normal and acknowledged). */
export class Alarm extends Model<InferAttributes<Alarm>, InferCreationAttributes<Alarm>> {
  declare id: CreationOptional<number>;
  declare engineId: number;
  declare rule: string;
  declare priority: AlarmPriority;
  declare state: string;
  declare active: CreationOptional<boolean>;
  declare raisedAt: Date;
  declare value: number | null;
  declare worstValue: number | null;
  declare unit: string | null;
  declare message: string;
  declare acknowledgedAt: CreationOptional<Date | null>;
  declare acknowledgedBy: CreationOptional<number | null>;
  declare note: CreationOptional<string | null>;
  declare shelvedUntil: CreationOptional<Date | null>;
  declare shelveReason: CreationOptional<string | null>;
  declare shelvedBy: CreationOptional<number | null>;
  declare clearedAt: CreationOptional<Date | null>;
  declare closedAt: CreationOptional<Date | null>;
  declare escalationLevel: CreationOptional<number>;
  declare lastNotifiedAt: CreationOptional<Date | null>;
  /** First found chattering (returned to alarm N times within the window), null when never. */
  declare chatteringAt: CreationOptional<Date | null>;
  /** Raised from late data: its e-mail is held since the data arrived (0014), until the data catches up; null = none held. */
  declare mailHeldSince: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initAlarm(sequelize: Sequelize): typeof Alarm {
  // fresh objects per attribute: Sequelize writes into attribute definitions
  const date = () => ({ type: DataTypes.DATE, allowNull: true });
  const num = () => ({ type: DataTypes.DOUBLE, allowNull: true });
  return Alarm.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      engineId: { type: DataTypes.INTEGER, allowNull: false },
      rule: { type: DataTypes.STRING(40), allowNull: false },
      priority: { type: DataTypes.STRING(8), allowNull: false },
      state: { type: DataTypes.STRING(32), allowNull: false },
      active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
      raisedAt: { type: DataTypes.DATE, allowNull: false },
      value: num(),
      worstValue: num(),
      unit: { type: DataTypes.STRING(16), allowNull: true },
      message: { type: DataTypes.STRING(500), allowNull: false },
      acknowledgedAt: date(),
      acknowledgedBy: { type: DataTypes.INTEGER, allowNull: true },
      note: { type: DataTypes.STRING(1000), allowNull: true },
      shelvedUntil: date(),
      shelveReason: { type: DataTypes.STRING(500), allowNull: true },
      shelvedBy: { type: DataTypes.INTEGER, allowNull: true },
      clearedAt: date(),
      closedAt: date(),
      escalationLevel: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      lastNotifiedAt: date(),
      chatteringAt: date(),
      mailHeldSince: date(),
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'alarms', underscored: true },
  );
}
