import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** One entry of the on-call rota: who answers alarms of a site from starts_at to ends_at, with a backup. */
export class OncallShift extends Model<InferAttributes<OncallShift>, InferCreationAttributes<OncallShift>> {
  declare id: CreationOptional<number>;
  declare siteId: number;
  declare userId: number;
  declare backupUserId: number | null;
  declare startsAt: Date;
  declare endsAt: Date;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initOncallShift(sequelize: Sequelize): typeof OncallShift {
  return OncallShift.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      siteId: { type: DataTypes.INTEGER, allowNull: false },
      userId: { type: DataTypes.INTEGER, allowNull: false },
      backupUserId: { type: DataTypes.INTEGER, allowNull: true },
      startsAt: { type: DataTypes.DATE, allowNull: false },
      endsAt: { type: DataTypes.DATE, allowNull: false },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'oncall_shifts', underscored: true },
  );
}
