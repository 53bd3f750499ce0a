import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

import type { Construction, VfSource } from '../../../shared/schemas/cables';

export { CONSTRUCTIONS, VF_SOURCES, type Construction, type VfSource } from '../../../shared/schemas/cables';

/** One entry of the cable library. Stored in SI; the trace engine takes vf, vfTolerance and z0Ohm from here. */
export class CableType extends Model<InferAttributes<CableType>, InferCreationAttributes<CableType>> {
  declare id: CreationOptional<number>;
  declare name: string;
  declare construction: Construction;
  declare dielectric: string;
  declare z0Ohm: number;
  declare vf: number;
  /** ± fraction of vf, e.g. 0.02 for ±2 %. */
  declare vfTolerance: number;
  declare attenuationDbPer100m: number | null;
  declare attenuationFreqMhz: number | null;
  declare vfSource: VfSource;
  declare vfReference: string;
  declare notes: string | null;
  /**
   * Starts at 1 and goes up by one whenever a value the trace engine uses
   * (vf, vfTolerance, z0Ohm) changes — by an edit, an import or an accepted
   * calibration. A trace stores the revision it was analysed with; if the
   * library's revision is now higher, the value has changed since
   * (server/cables/cables.service.ts: cableTypeVersion, changesSince).
   */
  declare revision: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initCableType(sequelize: Sequelize) {
  CableType.init(
    {
      id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
      name: { type: DataTypes.STRING(120), allowNull: false, unique: true },
      construction: { type: DataTypes.STRING(20), allowNull: false },
      dielectric: { type: DataTypes.STRING(120), allowNull: false },
      z0Ohm: { type: DataTypes.DOUBLE, allowNull: false },
      vf: { type: DataTypes.DOUBLE, allowNull: false },
      vfTolerance: { type: DataTypes.DOUBLE, allowNull: false },
      attenuationDbPer100m: { type: DataTypes.DOUBLE, allowNull: true },
      attenuationFreqMhz: { type: DataTypes.DOUBLE, allowNull: true },
      vfSource: { type: DataTypes.STRING(20), allowNull: false },
      vfReference: { type: DataTypes.TEXT, allowNull: false },
      notes: { type: DataTypes.TEXT, allowNull: true },
      revision: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'cable_types', modelName: 'CableType', underscored: true },
  );
}
