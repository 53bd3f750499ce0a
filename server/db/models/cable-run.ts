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
import type { CableType } from './cable-type';
import type { RouteMarker } from './route-marker';
import type { Site } from './site';

/** One length of cable at a site, from end A to end B, of one cable type. */
export class CableRun extends Model<InferAttributes<CableRun>, InferCreationAttributes<CableRun>> {
  declare id: CreationOptional<number>;
  declare siteId: number;
  declare name: string;
  /** The name as a reader sees it (nameKey), kept by a hook; unique within its scope. */
  declare nameKey: CreationOptional<string>;
  declare cableTypeId: number;
  declare endALabel: string;
  declare endBLabel: string;
  /** Cable length from end A to end B as installed, slack included (metres). */
  declare installedLengthM: number;
  declare notes: string | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare site?: NonAttribute<Site>;
  declare cableType?: NonAttribute<CableType>;
  declare markers?: NonAttribute<RouteMarker[]>;
}

export function initCableRun(sequelize: Sequelize) {
  CableRun.init(
    {
      id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
      siteId: { type: DataTypes.INTEGER, allowNull: false },
      name: { type: DataTypes.STRING(120), allowNull: false },
      nameKey: { type: DataTypes.STRING(480), allowNull: true },
      cableTypeId: { type: DataTypes.INTEGER, allowNull: false },
      endALabel: { type: DataTypes.STRING(120), allowNull: false },
      endBLabel: { type: DataTypes.STRING(120), allowNull: false },
      installedLengthM: { type: DataTypes.DOUBLE, allowNull: false },
      notes: { type: DataTypes.TEXT, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'cable_runs', modelName: 'CableRun', underscored: true },
  );
  keepNameKey(CableRun);
}
