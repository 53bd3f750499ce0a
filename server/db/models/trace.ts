import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type NonAttribute,
  type Sequelize,
} from 'sequelize';
import type { DeviceAnalysis } from '../../../shared/schemas/device-analysis';
import type { TraceAnalysis } from '../../../shared/schemas/trace-analysis';
import type { CableEnd, TraceSettings, TraceStatus } from '../../../shared/schemas/traces';
import type { CableRun } from './cable-run';
import type { User } from './user';

/**
 * One uploaded TDR trace. The raw file is kept unchanged at `rawPath` (under
 * the upload directory) with its SHA-256; the analysis records the VF,
 * tolerance, Z0 and engine version it was made with. A file the engine could
 * not read is kept too, with status 'failed' and the engine's message.
 */
export class Trace extends Model<InferAttributes<Trace>, InferCreationAttributes<Trace>> {
  declare id: CreationOptional<number>;
  declare cableRunId: number;
  declare end: CableEnd;
  declare uploadedById: number;
  declare originalName: string;
  /** Relative to the upload directory. */
  declare rawPath: string;
  declare sha256: string;
  declare sizeBytes: number;
  declare status: TraceStatus;
  declare errorCode: string | null;
  declare errorMessage: string | null;
  declare errorLine: number | null;
  declare errorField: string | null;
  declare settings: TraceSettings;
  declare vf: number;
  declare vfTolerance: number;
  declare z0Ohm: number | null;
  declare vfOverrideReason: string | null;
  /** The cable type the trace was analysed as (its run may be given another since); null before it was recorded. */
  declare cableTypeId: CreationOptional<number | null>;
  /** The cable type's revision at analysis time; compare with the library's to tell a changed VF. */
  declare cableTypeRevision: number | null;
  declare engineVersion: string;
  declare analysis: TraceAnalysis | null;
  declare isReference: CreationOptional<boolean>;
  /** Set on a re-analysis: the trace (same stored file) whose analysis this one replaces. */
  declare reanalysisOfId: CreationOptional<number | null>;
  /** Set while the trace is archived: kept, but left out of the lists (history in trace_archive_events). */
  declare archivedAt: CreationOptional<Date | null>;
  /** What the phone made of the file before it was uploaded (analysed on a device while offline). */
  declare deviceAnalysis: CreationOptional<DeviceAnalysis | null>;
  /** Background analysis (large uploads): tries so far, and until when the instance analysing it holds it. */
  declare analysisAttempts: CreationOptional<number>;
  declare analysisLeaseUntil: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare cableRun?: NonAttribute<CableRun>;
  declare uploadedBy?: NonAttribute<User>;
}

export function initTrace(sequelize: Sequelize) {
  Trace.init(
    {
      id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
      cableRunId: { type: DataTypes.INTEGER, allowNull: false },
      end: { type: DataTypes.STRING(1), allowNull: false },
      uploadedById: { type: DataTypes.INTEGER, allowNull: false },
      originalName: { type: DataTypes.STRING(255), allowNull: false },
      rawPath: { type: DataTypes.STRING(500), allowNull: false },
      sha256: { type: DataTypes.STRING(64), allowNull: false },
      sizeBytes: { type: DataTypes.INTEGER, allowNull: false },
      status: { type: DataTypes.STRING(10), allowNull: false },
      errorCode: { type: DataTypes.STRING(40), allowNull: true },
      errorMessage: { type: DataTypes.TEXT, allowNull: true },
      errorLine: { type: DataTypes.INTEGER, allowNull: true },
      errorField: { type: DataTypes.STRING(120), allowNull: true },
      settings: { type: DataTypes.JSON, allowNull: false },
      vf: { type: DataTypes.DOUBLE, allowNull: false },
      vfTolerance: { type: DataTypes.DOUBLE, allowNull: false },
      z0Ohm: { type: DataTypes.DOUBLE, allowNull: true },
      vfOverrideReason: { type: DataTypes.TEXT, allowNull: true },
      cableTypeId: { type: DataTypes.INTEGER, allowNull: true },
      cableTypeRevision: { type: DataTypes.INTEGER, allowNull: true },
      engineVersion: { type: DataTypes.STRING(20), allowNull: false },
      analysis: { type: DataTypes.JSON, allowNull: true },
      isReference: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      reanalysisOfId: { type: DataTypes.INTEGER, allowNull: true },
      archivedAt: { type: DataTypes.DATE, allowNull: true },
      deviceAnalysis: { type: DataTypes.JSON, allowNull: true },
      analysisAttempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      analysisLeaseUntil: { type: DataTypes.DATE, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'traces', modelName: 'Trace', underscored: true },
  );
}
