import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export const ROLES = ['admin', 'planner', 'technician', 'operator'] as const;
export type Role = (typeof ROLES)[number];

export class User extends Model<InferAttributes<User>, InferCreationAttributes<User>> {
  declare id: CreationOptional<number>;
  declare email: string;
  declare name: string;
  declare passwordHash: string;
  declare role: Role;
  declare disabled: CreationOptional<boolean>;
  /** Raised to end every session signed before (disable, role, sites, password). */
  declare sessionVersion: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  /** Never expose the hash. */
  override toJSON(): Omit<InferAttributes<User>, 'passwordHash'> {
    const rest: Partial<InferAttributes<User>> = this.get({ plain: true });
    delete rest.passwordHash;
    delete rest.sessionVersion;
    return rest as Omit<InferAttributes<User>, 'passwordHash'>;
  }
}

export function initUser(sequelize: Sequelize): typeof User {
  return User.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      email: {
        type: DataTypes.STRING(254),
        allowNull: false,
        unique: true,
        set(v: string) {
          this.setDataValue('email', v.trim().toLowerCase());
        },
      },
      name: { type: DataTypes.STRING(120), allowNull: false },
      passwordHash: { type: DataTypes.STRING(100), allowNull: false },
      role: { type: DataTypes.STRING(16), allowNull: false, validate: { isIn: [ROLES as unknown as string[]] } },
      disabled: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      sessionVersion: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'users', underscored: true },
  );
}
