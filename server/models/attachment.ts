import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** A photo or PDF on a work order (optionally on one step). The file sits in DATA_DIR/uploads under stored_name. */
export class Attachment extends Model<InferAttributes<Attachment>, InferCreationAttributes<Attachment>> {
  declare id: CreationOptional<number>;
  declare workOrderId: number;
  declare stepId: number | null;
  declare storedName: string;
  declare originalName: string;
  declare contentType: string;
  declare size: number;
  declare uploadedBy: number;
  declare createdAt: CreationOptional<Date>;
}

export function initAttachment(sequelize: Sequelize): typeof Attachment {
  return Attachment.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      workOrderId: { type: DataTypes.INTEGER, allowNull: false },
      stepId: { type: DataTypes.INTEGER, allowNull: true },
      storedName: { type: DataTypes.STRING(80), allowNull: false, unique: true },
      originalName: { type: DataTypes.STRING(255), allowNull: false },
      contentType: { type: DataTypes.STRING(64), allowNull: false },
      size: { type: DataTypes.INTEGER, allowNull: false },
      uploadedBy: { type: DataTypes.INTEGER, allowNull: false },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'attachments', underscored: true, updatedAt: false },
  );
}
