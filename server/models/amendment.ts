import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** A note appended to a closed work order: the record itself is never edited. */
export class Amendment extends Model<InferAttributes<Amendment>, InferCreationAttributes<Amendment>> {
  declare id: CreationOptional<number>;
  declare workOrderId: number;
  declare text: string;
  declare authorId: number;
  declare createdAt: CreationOptional<Date>;
}

export function initAmendment(sequelize: Sequelize): typeof Amendment {
  return Amendment.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      workOrderId: { type: DataTypes.INTEGER, allowNull: false },
      text: { type: DataTypes.TEXT, allowNull: false },
      authorId: { type: DataTypes.INTEGER, allowNull: false },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'amendments', underscored: true, updatedAt: false },
  );
}
