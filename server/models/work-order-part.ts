import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export const PART_KINDS = ['filter-charged', 'filter-blank', 'additive', 'coolant', 'other'] as const;
export type PartKind = (typeof PART_KINDS)[number];

/** A part or fluid used on a work order. Fluids in litres; filters and other parts as a count. */
export class WorkOrderPart extends Model<InferAttributes<WorkOrderPart>, InferCreationAttributes<WorkOrderPart>> {
  declare id: CreationOptional<number>;
  declare workOrderId: number;
  declare kind: PartKind;
  declare description: string | null;
  declare quantity: number;
  declare unit: 'L' | 'pcs';
  declare addedBy: number;
  declare createdAt: CreationOptional<Date>;
}

export function initWorkOrderPart(sequelize: Sequelize): typeof WorkOrderPart {
  return WorkOrderPart.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      workOrderId: { type: DataTypes.INTEGER, allowNull: false },
      kind: { type: DataTypes.STRING(20), allowNull: false },
      description: { type: DataTypes.STRING(300), allowNull: true },
      quantity: { type: DataTypes.DOUBLE, allowNull: false },
      unit: { type: DataTypes.STRING(8), allowNull: false },
      addedBy: { type: DataTypes.INTEGER, allowNull: false },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'work_order_parts', underscored: true, updatedAt: false },
  );
}
