import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export class Site extends Model<InferAttributes<Site>, InferCreationAttributes<Site>> {
  declare id: CreationOptional<number>;
  declare name: string;
  /** IANA zone name, e.g. America/Chicago: local times of the site (rota, schedules) use it. */
  declare timeZone: string;
  declare retiredAt: CreationOptional<Date | null>;
  /** Lowest expected temperature at the site, °C (coolant freeze protection is judged against it); null when not set. */
  declare designLowTempC: CreationOptional<number | null>;
  /** Metres above mean sea level (null: unknown, taken as sea level) for the standard-atmosphere pressure. */
  declare elevationM: CreationOptional<number | null>;
}

export function initSite(sequelize: Sequelize): typeof Site {
  return Site.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      name: { type: DataTypes.STRING(120), allowNull: false },
      timeZone: { type: DataTypes.STRING(64), allowNull: false },
      retiredAt: { type: DataTypes.DATE, allowNull: true },
      designLowTempC: { type: DataTypes.DOUBLE, allowNull: true, field: 'design_low_temp_c' },
      elevationM: { type: DataTypes.DOUBLE, allowNull: true },
    },
    { sequelize, tableName: 'sites', underscored: true, timestamps: false },
  );
}
