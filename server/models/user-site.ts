import { DataTypes, Model, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** A site a user may see (see server/services/site-access.ts for the rule). */
export class UserSite extends Model<InferAttributes<UserSite>, InferCreationAttributes<UserSite>> {
  declare userId: number;
  declare siteId: number;
}

export function initUserSite(sequelize: Sequelize): typeof UserSite {
  return UserSite.init(
    {
      userId: { type: DataTypes.INTEGER, allowNull: false, primaryKey: true },
      siteId: { type: DataTypes.INTEGER, allowNull: false, primaryKey: true },
    },
    { sequelize, tableName: 'user_sites', underscored: true, timestamps: false },
  );
}
