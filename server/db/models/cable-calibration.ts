import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type NonAttribute,
  type Sequelize,
} from 'sequelize';
import type { CableType } from './cable-type';
import type { TicketCloseout } from './ticket';
import type { User } from './user';

import type { CalibrationSource, CalibrationStatus } from '../../../shared/schemas/cables';

export { CALIBRATION_SOURCES, CALIBRATION_STATUSES, type CalibrationSource, type CalibrationStatus } from '../../../shared/schemas/cables';

/**
 * A field calibration: a known length and the round-trip time of its end
 * reflection, giving VF = 2L / (c·t). It waits for a planner's review; an
 * accepted one is written into the cable type (with a history entry).
 */
export class CableCalibration extends Model<InferAttributes<CableCalibration>, InferCreationAttributes<CableCalibration>> {
  declare id: CreationOptional<number>;
  declare cableTypeId: number;
  declare knownLengthM: number;
  declare roundTripNs: number;
  /** 2L/(c·t), computed at submission. */
  declare vf: number;
  /** The library's vf when this was submitted, for comparison in review. */
  declare libraryVf: number;
  declare source: CalibrationSource;
  declare traceId: number | null;
  declare note: string | null;
  declare status: CreationOptional<CalibrationStatus>;
  declare submittedById: number;
  declare reviewedById: number | null;
  declare reviewedAt: Date | null;
  declare reviewReason: string | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  declare cableType?: NonAttribute<CableType>;
  declare submittedBy?: NonAttribute<User>;
  declare reviewedBy?: NonAttribute<User>;
  /** The repair close-out that filed it (source 'repair-closeout'). */
  declare closeout?: NonAttribute<TicketCloseout> | null;
}

export function initCableCalibration(sequelize: Sequelize) {
  CableCalibration.init(
    {
      id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
      cableTypeId: { type: DataTypes.INTEGER, allowNull: false },
      knownLengthM: { type: DataTypes.DOUBLE, allowNull: false },
      roundTripNs: { type: DataTypes.DOUBLE, allowNull: false },
      vf: { type: DataTypes.DOUBLE, allowNull: false },
      libraryVf: { type: DataTypes.DOUBLE, allowNull: false },
      source: { type: DataTypes.STRING(20), allowNull: false },
      traceId: { type: DataTypes.INTEGER, allowNull: true },
      note: { type: DataTypes.TEXT, allowNull: true },
      status: { type: DataTypes.STRING(12), allowNull: false, defaultValue: 'pending' },
      submittedById: { type: DataTypes.INTEGER, allowNull: false },
      reviewedById: { type: DataTypes.INTEGER, allowNull: true },
      reviewedAt: { type: DataTypes.DATE, allowNull: true },
      reviewReason: { type: DataTypes.TEXT, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'cable_calibrations', modelName: 'CableCalibration', underscored: true },
  );
}

export function associateCableCalibration(models: { CableType: typeof CableType; User: typeof User; TicketCloseout: typeof TicketCloseout }) {
  // createApp may run more than once in a process (tests); an alias can be declared only once.
  if (CableCalibration.associations.cableType) return;
  CableCalibration.belongsTo(models.CableType, { as: 'cableType', foreignKey: 'cableTypeId' });
  CableCalibration.belongsTo(models.User, { as: 'submittedBy', foreignKey: 'submittedById' });
  CableCalibration.belongsTo(models.User, { as: 'reviewedBy', foreignKey: 'reviewedById' });
  CableCalibration.hasOne(models.TicketCloseout, { as: 'closeout', foreignKey: 'calibrationId' });
}
