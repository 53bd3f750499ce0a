import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type NonAttribute,
  type Sequelize,
} from 'sequelize';
import { keepNameKey } from '../name-key';
import type { User } from './user';

/** A place where cables are tested: a substation, a cabinet, a street. */
export class Site extends Model<InferAttributes<Site>, InferCreationAttributes<Site>> {
  declare id: CreationOptional<number>;
  declare name: string;
  /** The name as a reader sees it (nameKey), kept by a hook; unique within its scope. */
  declare nameKey: CreationOptional<string>;
  declare address: string | null;
  declare latitude: number | null;
  declare longitude: number | null;
  declare accessNotes: string | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare supervisors?: NonAttribute<User[]>;
}

export function initSite(sequelize: Sequelize) {
  Site.init(
    {
      id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
      name: { type: DataTypes.STRING(120), allowNull: false, unique: true },
      nameKey: { type: DataTypes.STRING(480), allowNull: true },
      address: { type: DataTypes.STRING(300), allowNull: true },
      latitude: { type: DataTypes.DOUBLE, allowNull: true },
      longitude: { type: DataTypes.DOUBLE, allowNull: true },
      accessNotes: { type: DataTypes.TEXT, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'sites', modelName: 'Site', underscored: true },
  );
  keepNameKey(Site);
}
