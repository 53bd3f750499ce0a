import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

export type CableReanalysisStatus = 'running' | 'done';

/** A planner's request to analyse again every current trace of one cable type with the library's values. */
export class CableReanalysis extends Model<InferAttributes<CableReanalysis>, InferCreationAttributes<CableReanalysis>> {
  declare id: CreationOptional<number>;
  declare cableTypeId: number;
  declare cableTypeRevision: number;
  declare vf: number;
  declare requestedById: number;
  declare status: CableReanalysisStatus;
  declare traceTotal: number;
  /** The traces chosen when the request was made, in order. */
  declare traceIds: number[];
  declare finishedAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export type CableReanalysisOutcome = 'ok' | 'failed' | 'skipped';

/** One trace of a re-analysis, done: at most one per request and trace (a unique index). */
export class CableReanalysisItem extends Model<InferAttributes<CableReanalysisItem>, InferCreationAttributes<CableReanalysisItem>> {
  declare id: CreationOptional<number>;
  declare reanalysisId: number;
  /** The trace analysed again (it stays as it was). */
  declare traceId: number;
  /** The new trace row holding the new analysis; null when the stored file could not be used. */
  declare resultTraceId: number | null;
  declare outcome: CableReanalysisOutcome;
  declare note: string | null;
  /** Findings made from the earlier trace, how many of them the new analysis places elsewhere, how many it no longer finds. */
  declare findings: number;
  declare findingsMoved: number;
  declare findingsUnmatched: number;
  /** Largest and summed absolute move of those findings, metres. */
  declare maxShiftM: number | null;
  declare sumShiftM: number;
  declare createdAt: CreationOptional<Date>;
}

export function initCableReanalysis(sequelize: Sequelize) {
  CableReanalysis.init(
    {
      id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
      cableTypeId: { type: DataTypes.INTEGER, allowNull: false },
      cableTypeRevision: { type: DataTypes.INTEGER, allowNull: false },
      vf: { type: DataTypes.DOUBLE, allowNull: false },
      requestedById: { type: DataTypes.INTEGER, allowNull: false },
      status: { type: DataTypes.STRING(10), allowNull: false },
      traceTotal: { type: DataTypes.INTEGER, allowNull: false },
      traceIds: { type: DataTypes.JSON, allowNull: false },
      finishedAt: { type: DataTypes.DATE, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'cable_reanalyses', underscored: true },
  );
  CableReanalysisItem.init(
    {
      id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
      reanalysisId: { type: DataTypes.INTEGER, allowNull: false },
      traceId: { type: DataTypes.INTEGER, allowNull: false },
      resultTraceId: { type: DataTypes.INTEGER, allowNull: true },
      outcome: { type: DataTypes.STRING(12), allowNull: false },
      note: { type: DataTypes.STRING(300), allowNull: true },
      findings: { type: DataTypes.INTEGER, allowNull: false },
      findingsMoved: { type: DataTypes.INTEGER, allowNull: false },
      findingsUnmatched: { type: DataTypes.INTEGER, allowNull: false },
      maxShiftM: { type: DataTypes.DOUBLE, allowNull: true },
      sumShiftM: { type: DataTypes.DOUBLE, allowNull: false },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'cable_reanalysis_items', underscored: true, updatedAt: false },
  );
}
