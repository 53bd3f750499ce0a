import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import { keepNameKey } from '../name-key';

import type { AttenuationPoint, Construction, PulseVf, VfSource } from '../../../shared/schemas/cables';

export { CONSTRUCTIONS, VF_SOURCES, type Construction, type VfSource } from '../../../shared/schemas/cables';

/** One entry of the cable library. Stored in SI; the trace engine takes vf, vfTolerance and z0Ohm from here. */
export class CableType extends Model<InferAttributes<CableType>, InferCreationAttributes<CableType>> {
  declare id: CreationOptional<number>;
  declare name: string;
  /** The name as a reader sees it (nameKey), kept by a hook; unique within its scope. */
  declare nameKey: CreationOptional<string>;
  declare construction: Construction;
  declare dielectric: string;
  declare z0Ohm: number;
  declare vf: number;
  /** ± fraction of vf, e.g. 0.02 for ±2 %. */
  declare vfTolerance: number;
  /** The lowest point of `attenuation`, kept for the older one-point form. */
  declare attenuationDbPer100m: number | null;
  declare attenuationFreqMhz: number | null;
  /** dB per 100 m at stated frequencies, lowest frequency first. */
  declare attenuation: CreationOptional<AttenuationPoint[]>;
  declare lossSource: CreationOptional<string | null>;
  /** Line constants per metre: R(f) = rDc + skin·√f, G(f) = g + 2πf·C·lossTangent. */
  declare rDcOhmPerM: CreationOptional<number | null>;
  declare skinOhmPerMRootHz: CreationOptional<number | null>;
  declare lHPerM: CreationOptional<number | null>;
  declare cFPerM: CreationOptional<number | null>;
  declare gSPerM: CreationOptional<number | null>;
  declare lossTangent: CreationOptional<number | null>;
  /** VFs measured with given pulse widths, shortest first. */
  declare pulseVfs: CreationOptional<PulseVf[]>;
  declare vfSource: VfSource;
  declare vfReference: string;
  declare notes: string | null;
  /**
   * Starts at 1 and goes up by one whenever a value the trace engine uses
   * (vf, vfTolerance, z0Ohm, the loss figures, the pulse-width VFs) changes — by an edit, an import or an accepted
   * calibration. A trace stores the revision it was analysed with; if the
   * library's revision is now higher, the value has changed since
   * (server/cables/cables.service.ts: cableTypeVersion, changesSince).
   */
  declare revision: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

/** A list stored as JSON text, so SQLite and PostgreSQL behave the same. */
function jsonList<T>(attribute: 'attenuation' | 'pulseVfs', column: string) {
  return {
    type: DataTypes.TEXT,
    allowNull: false,
    defaultValue: '[]',
    field: column,
    get(this: CableType): T[] {
      const raw = this.getDataValue(attribute) as unknown;
      if (Array.isArray(raw)) return raw as T[];
      return typeof raw === 'string' && raw ? (JSON.parse(raw) as T[]) : [];
    },
    set(this: CableType, value: T[]) {
      this.setDataValue(attribute, JSON.stringify(value ?? []) as never);
    },
  };
}

export function initCableType(sequelize: Sequelize) {
  CableType.init(
    {
      id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
      name: { type: DataTypes.STRING(120), allowNull: false, unique: true },
      nameKey: { type: DataTypes.STRING(480), allowNull: true },
      construction: { type: DataTypes.STRING(20), allowNull: false },
      dielectric: { type: DataTypes.STRING(120), allowNull: false },
      z0Ohm: { type: DataTypes.DOUBLE, allowNull: false },
      vf: { type: DataTypes.DOUBLE, allowNull: false },
      vfTolerance: { type: DataTypes.DOUBLE, allowNull: false },
      attenuationDbPer100m: { type: DataTypes.DOUBLE, allowNull: true },
      attenuationFreqMhz: { type: DataTypes.DOUBLE, allowNull: true },
      attenuation: jsonList<AttenuationPoint>('attenuation', 'attenuation_points'),
      lossSource: { type: DataTypes.TEXT, allowNull: true },
      rDcOhmPerM: { type: DataTypes.DOUBLE, allowNull: true },
      skinOhmPerMRootHz: { type: DataTypes.DOUBLE, allowNull: true },
      lHPerM: { type: DataTypes.DOUBLE, allowNull: true },
      cFPerM: { type: DataTypes.DOUBLE, allowNull: true },
      gSPerM: { type: DataTypes.DOUBLE, allowNull: true },
      lossTangent: { type: DataTypes.DOUBLE, allowNull: true },
      pulseVfs: jsonList<PulseVf>('pulseVfs', 'pulse_vfs'),
      vfSource: { type: DataTypes.STRING(20), allowNull: false },
      vfReference: { type: DataTypes.TEXT, allowNull: false },
      notes: { type: DataTypes.TEXT, allowNull: true },
      revision: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'cable_types', modelName: 'CableType', underscored: true },
  );
  keepNameKey(CableType);
}
