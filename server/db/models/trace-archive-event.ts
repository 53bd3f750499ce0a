import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from 'sequelize';
import type { ArchiveAction } from '../../../shared/schemas/trace-outcomes';
import type { User } from './user';

/** One archive or restore of a trace: who, when and why. Rows are only ever added. */
export class TraceArchiveEvent extends Model<InferAttributes<TraceArchiveEvent>, InferCreationAttributes<TraceArchiveEvent>> {
  declare id: CreationOptional<number>;
  declare traceId: number;
  declare action: ArchiveAction;
  declare reason: string;
  declare byId: number;
  declare createdAt: CreationOptional<Date>;
  declare by?: NonAttribute<User>;
}

export function initTraceArchiveEvent(sequelize: Sequelize) {
  TraceArchiveEvent.init(
    {
      id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
      traceId: { type: DataTypes.INTEGER, allowNull: false },
      action: { type: DataTypes.STRING(10), allowNull: false },
      reason: { type: DataTypes.TEXT, allowNull: false },
      byId: { type: DataTypes.INTEGER, allowNull: false },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'trace_archive_events', modelName: 'TraceArchiveEvent', underscored: true, updatedAt: false },
  );
}

export function associateTraceArchiveEvent(models: { User: typeof User }) {
  if (TraceArchiveEvent.associations.by) return;
  TraceArchiveEvent.belongsTo(models.User, { as: 'by', foreignKey: 'byId' });
}
