import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** A message the local mail catcher received over SMTP. */
export class CaughtMail extends Model<InferAttributes<CaughtMail>, InferCreationAttributes<CaughtMail>> {
  declare id: CreationOptional<number>;
  declare to: string;
  declare from: string | null;
  declare subject: string | null;
  declare text: string | null;
  declare html: string | null;
  declare messageId: string | null;
  declare receivedAt: Date;
}

export function initCaughtMail(sequelize: Sequelize): typeof CaughtMail {
  return CaughtMail.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      to: { type: DataTypes.STRING(1000), allowNull: false },
      from: { type: DataTypes.STRING(300), allowNull: true },
      subject: { type: DataTypes.STRING(300), allowNull: true },
      text: { type: DataTypes.TEXT, allowNull: true },
      html: { type: DataTypes.TEXT, allowNull: true },
      messageId: { type: DataTypes.STRING(300), allowNull: true },
      receivedAt: { type: DataTypes.DATE, allowNull: false },
    },
    { sequelize, tableName: 'caught_mail', underscored: true, timestamps: false },
  );
}
