import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { MarkerKind } from '../../../shared/schemas/sites';

/**
 * A landmark along a cable run's route. `chainageM` is the ground distance
 * from end A along the route; `slackM` is the extra cable coiled there, which
 * the electrical distance includes but the route does not.
 */
export class RouteMarker extends Model<InferAttributes<RouteMarker>, InferCreationAttributes<RouteMarker>> {
  declare id: CreationOptional<number>;
  declare cableRunId: number;
  declare label: string;
  declare kind: MarkerKind;
  declare chainageM: number;
  declare slackM: CreationOptional<number>;
  declare notes: string | null;
  /** WGS 84 degrees, both or neither: where the marker is on the ground, if surveyed. */
  declare latitude: CreationOptional<number | null>;
  declare longitude: CreationOptional<number | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initRouteMarker(sequelize: Sequelize) {
  RouteMarker.init(
    {
      id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
      cableRunId: { type: DataTypes.INTEGER, allowNull: false },
      label: { type: DataTypes.STRING(60), allowNull: false },
      kind: { type: DataTypes.STRING(20), allowNull: false },
      chainageM: { type: DataTypes.DOUBLE, allowNull: false },
      slackM: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
      notes: { type: DataTypes.TEXT, allowNull: true },
      latitude: { type: DataTypes.DOUBLE, allowNull: true },
      longitude: { type: DataTypes.DOUBLE, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'route_markers', modelName: 'RouteMarker', underscored: true },
  );
}
