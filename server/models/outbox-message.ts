import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** A message waiting to be sent (or sent): written first, so none is lost while the relay is down. */
export class OutboxMessage extends Model<InferAttributes<OutboxMessage>, InferCreationAttributes<OutboxMessage>> {
  declare id: CreationOptional<number>;
  declare to: string;
  declare subject: string;
  declare text: string;
  declare html: string | null;
  declare alarmId: number | null;
  /** `<random@domain>`, generated once when queued and sent with every attempt. */
  declare messageId: CreationOptional<string | null>;
  declare attempts: CreationOptional<number>;
  declare nextAttemptAt: Date;
  declare sentAt: CreationOptional<Date | null>;
  declare lastError: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initOutboxMessage(sequelize: Sequelize): typeof OutboxMessage {
  return OutboxMessage.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      to: { type: DataTypes.STRING(1000), allowNull: false },
      subject: { type: DataTypes.STRING(300), allowNull: false },
      text: { type: DataTypes.TEXT, allowNull: false },
      html: { type: DataTypes.TEXT, allowNull: true },
      alarmId: { type: DataTypes.INTEGER, allowNull: true },
      messageId: { type: DataTypes.STRING(300), allowNull: true },
      attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      nextAttemptAt: { type: DataTypes.DATE, allowNull: false },
      sentAt: { type: DataTypes.DATE, allowNull: true },
      lastError: { type: DataTypes.STRING(1000), allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'outbox', underscored: true },
  );
}
