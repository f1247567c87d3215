import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { RuleDefinition } from '../services/alarms/rule-definitions';

/** A named set of rule definitions; the default one applies to every engine without an override. */
export class RuleProfile extends Model<InferAttributes<RuleProfile>, InferCreationAttributes<RuleProfile>> {
  declare id: CreationOptional<number>;
  declare name: string;
  declare isDefault: CreationOptional<boolean>;
  declare rules: RuleDefinition[];
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initRuleProfile(sequelize: Sequelize): typeof RuleProfile {
  return RuleProfile.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      name: { type: DataTypes.STRING(80), allowNull: false, unique: true },
      isDefault: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      rules: { type: DataTypes.JSON, allowNull: false },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'rule_profiles', underscored: true },
  );
}
