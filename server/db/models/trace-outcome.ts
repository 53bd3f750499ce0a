import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from 'sequelize';
import type { TraceOutcomeKind } from '../../../shared/schemas/trace-outcomes';
import type { User } from './user';

/**
 * What a trace showed besides a fault: the run's far end on a healthy cable
 * (its measured length, with the window and the VF it was read with), or a
 * calibration filed from that far end.
 */
export class TraceOutcome extends Model<InferAttributes<TraceOutcome>, InferCreationAttributes<TraceOutcome>> {
  declare id: CreationOptional<number>;
  declare traceId: number;
  declare cableRunId: number;
  declare kind: TraceOutcomeKind;
  declare eventIndex: number;
  declare measuredLengthM: number;
  declare windowStartM: number;
  declare windowEndM: number;
  declare installedLengthM: number;
  declare vf: number;
  declare calibrationId: number | null;
  declare note: string | null;
  declare recordedById: number;
  declare createdAt: CreationOptional<Date>;
  declare recordedBy?: NonAttribute<User>;
}

export function initTraceOutcome(sequelize: Sequelize) {
  TraceOutcome.init(
    {
      id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
      traceId: { type: DataTypes.INTEGER, allowNull: false },
      cableRunId: { type: DataTypes.INTEGER, allowNull: false },
      kind: { type: DataTypes.STRING(30), allowNull: false },
      eventIndex: { type: DataTypes.INTEGER, allowNull: false },
      measuredLengthM: { type: DataTypes.DOUBLE, allowNull: false },
      windowStartM: { type: DataTypes.DOUBLE, allowNull: false },
      windowEndM: { type: DataTypes.DOUBLE, allowNull: false },
      installedLengthM: { type: DataTypes.DOUBLE, allowNull: false },
      vf: { type: DataTypes.DOUBLE, allowNull: false },
      calibrationId: { type: DataTypes.INTEGER, allowNull: true },
      note: { type: DataTypes.TEXT, allowNull: true },
      recordedById: { type: DataTypes.INTEGER, allowNull: false },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'trace_outcomes', modelName: 'TraceOutcome', underscored: true, updatedAt: false },
  );
}

export function associateTraceOutcome(models: { User: typeof User }) {
  // createApp may run more than once in a process (tests); an alias can be declared only once.
  if (TraceOutcome.associations.recordedBy) return;
  TraceOutcome.belongsTo(models.User, { as: 'recordedBy', foreignKey: 'recordedById' });
}
