import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { ScoredMethod } from '../../../shared/schemas/method-scores';

/**
 * One method's estimate of a fault scored against where the crew found it, at
 * close-out. Errors are located minus found, metres of cable from the end the
 * method measured from (positive: it put the fault too far from its end).
 * `method` is a location method, or 'best-location' for the fused result.
 */
export class MethodScore extends Model<InferAttributes<MethodScore>, InferCreationAttributes<MethodScore>> {
  declare id: CreationOptional<number>;
  declare closeoutId: number;
  declare ticketId: number;
  declare findingId: number;
  declare cableTypeId: number;
  declare measurementId: number | null;
  declare method: ScoredMethod;
  declare label: string;
  declare fromEnd: 'A' | 'B';
  declare used: boolean;
  declare locatedFromAM: number;
  declare locatedFromEndM: number;
  declare standardUncertaintyM: number;
  declare windowStartM: number;
  declare windowEndM: number;
  declare foundFromAM: number;
  declare foundFromEndM: number;
  declare errorM: number;
  declare withinWindow: boolean;
  declare createdAt: CreationOptional<Date>;
}

export function initMethodScore(sequelize: Sequelize) {
  MethodScore.init(
    {
      id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
      closeoutId: { type: DataTypes.INTEGER, allowNull: false },
      ticketId: { type: DataTypes.INTEGER, allowNull: false },
      findingId: { type: DataTypes.INTEGER, allowNull: false },
      cableTypeId: { type: DataTypes.INTEGER, allowNull: false },
      measurementId: { type: DataTypes.INTEGER, allowNull: true },
      method: { type: DataTypes.STRING(30), allowNull: false },
      label: { type: DataTypes.STRING(200), allowNull: false },
      fromEnd: { type: DataTypes.STRING(1), allowNull: false },
      used: { type: DataTypes.BOOLEAN, allowNull: false },
      locatedFromAM: { type: DataTypes.DOUBLE, allowNull: false, field: 'located_from_a_m' },
      locatedFromEndM: { type: DataTypes.DOUBLE, allowNull: false },
      standardUncertaintyM: { type: DataTypes.DOUBLE, allowNull: false },
      windowStartM: { type: DataTypes.DOUBLE, allowNull: false },
      windowEndM: { type: DataTypes.DOUBLE, allowNull: false },
      foundFromAM: { type: DataTypes.DOUBLE, allowNull: false, field: 'found_from_a_m' },
      foundFromEndM: { type: DataTypes.DOUBLE, allowNull: false },
      errorM: { type: DataTypes.DOUBLE, allowNull: false },
      withinWindow: { type: DataTypes.BOOLEAN, allowNull: false },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'method_scores', modelName: 'MethodScore', underscored: true, updatedAt: false },
  );
}
