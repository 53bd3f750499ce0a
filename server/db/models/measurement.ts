import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type NonAttribute,
  type Sequelize,
} from 'sequelize';
import type { MeasurementKind, MeasurementReadings, MeasurementStatus } from '../../../shared/schemas/measurements';
import type { User } from './user';

/**
 * A fault-location reading other than a TDR trace: the bridge or meter
 * readings as entered (SI units, see shared/schemas/measurements.ts), who
 * took them, when and with which instrument. Rows are never edited: a
 * correction is a new row with `supersedesId`, the old one turns 'corrected'.
 */
export class Measurement extends Model<InferAttributes<Measurement>, InferCreationAttributes<Measurement>> {
  declare id: CreationOptional<number>;
  declare cableRunId: number;
  declare findingId: number | null;
  declare kind: MeasurementKind;
  declare readings: MeasurementReadings['readings'];
  declare instrument: string;
  declare measuredAt: Date;
  declare note: string | null;
  declare status: MeasurementStatus;
  declare recordedById: number;
  declare supersedesId: number | null;
  declare changeReason: string | null;
  declare withdrawnById: number | null;
  declare withdrawnAt: Date | null;
  declare withdrawReason: string | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare recordedBy?: NonAttribute<User>;
  declare withdrawnBy?: NonAttribute<User>;
}

export function initMeasurement(sequelize: Sequelize) {
  Measurement.init(
    {
      id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
      cableRunId: { type: DataTypes.INTEGER, allowNull: false },
      findingId: { type: DataTypes.INTEGER, allowNull: true },
      kind: { type: DataTypes.STRING(20), allowNull: false },
      readings: { type: DataTypes.JSON, allowNull: false },
      instrument: { type: DataTypes.STRING(200), allowNull: false },
      measuredAt: { type: DataTypes.DATE, allowNull: false },
      note: { type: DataTypes.TEXT, allowNull: true },
      status: { type: DataTypes.STRING(10), allowNull: false },
      recordedById: { type: DataTypes.INTEGER, allowNull: false },
      supersedesId: { type: DataTypes.INTEGER, allowNull: true },
      changeReason: { type: DataTypes.TEXT, allowNull: true },
      withdrawnById: { type: DataTypes.INTEGER, allowNull: true },
      withdrawnAt: { type: DataTypes.DATE, allowNull: true },
      withdrawReason: { type: DataTypes.TEXT, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'measurements', modelName: 'Measurement', underscored: true },
  );
}

export function associateMeasurement(models: { User: typeof User }) {
  Measurement.belongsTo(models.User, { as: 'recordedBy', foreignKey: 'recordedById' });
  Measurement.belongsTo(models.User, { as: 'withdrawnBy', foreignKey: 'withdrawnById' });
}
