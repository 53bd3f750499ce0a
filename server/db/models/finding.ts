import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type NonAttribute,
  type Sequelize,
} from 'sequelize';
import type { RoutePosition } from '../../../shared/field/route-position';
import type { FindingStatus } from '../../../shared/schemas/findings';
import type { CableRun } from './cable-run';
import type { Site } from './site';
import type { Trace } from './trace';
import type { User } from './user';

/**
 * A technician's verdict on one event of a trace: confirmed as a fault (with
 * where to dig) or dismissed. Distances are metres along the cable from the
 * end the trace was taken at; `routePosition` is the same point on the ground.
 */
export class Finding extends Model<InferAttributes<Finding>, InferCreationAttributes<Finding>> {
  declare id: CreationOptional<number>;
  declare siteId: number;
  declare cableRunId: number;
  declare traceId: number;
  declare eventIndex: number;
  declare kind: string;
  declare note: string | null;
  declare roundTripNs: number;
  /** Electrical distance from the measured end. */
  declare distanceM: number;
  declare uncertaintyM: number;
  declare windowStartM: number;
  declare windowEndM: number;
  /** Electrical distance from end A (equal to distanceM when measured from A). */
  declare distanceFromAM: number;
  declare routePosition: RoutePosition | null;
  /** "18.4 m past manhole MH-3 toward pedestal P-7, dig window 17.2–19.6 m" (metres; the client re-words it in feet). */
  declare routePositionText: string;
  declare status: FindingStatus;
  declare confirmedById: number;
  declare confirmedAt: Date;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare site?: NonAttribute<Site>;
  declare cableRun?: NonAttribute<CableRun>;
  declare trace?: NonAttribute<Trace>;
  declare confirmedBy?: NonAttribute<User>;
}

export function initFinding(sequelize: Sequelize) {
  Finding.init(
    {
      id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
      siteId: { type: DataTypes.INTEGER, allowNull: false },
      cableRunId: { type: DataTypes.INTEGER, allowNull: false },
      traceId: { type: DataTypes.INTEGER, allowNull: false },
      eventIndex: { type: DataTypes.INTEGER, allowNull: false },
      kind: { type: DataTypes.STRING(40), allowNull: false },
      note: { type: DataTypes.TEXT, allowNull: true },
      roundTripNs: { type: DataTypes.DOUBLE, allowNull: false },
      distanceM: { type: DataTypes.DOUBLE, allowNull: false },
      uncertaintyM: { type: DataTypes.DOUBLE, allowNull: false },
      windowStartM: { type: DataTypes.DOUBLE, allowNull: false },
      windowEndM: { type: DataTypes.DOUBLE, allowNull: false },
      distanceFromAM: { type: DataTypes.DOUBLE, allowNull: false, field: 'distance_from_a_m' },
      routePosition: { type: DataTypes.JSON, allowNull: true },
      routePositionText: { type: DataTypes.TEXT, allowNull: false },
      status: { type: DataTypes.STRING(12), allowNull: false },
      confirmedById: { type: DataTypes.INTEGER, allowNull: false },
      confirmedAt: { type: DataTypes.DATE, allowNull: false },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'findings', modelName: 'Finding', underscored: true },
  );
}
