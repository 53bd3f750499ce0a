import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type NonAttribute,
  type Sequelize,
} from 'sequelize';
import type { FindingDecisionAction } from '../../../shared/schemas/finding-decisions';
import type { FindingStatus } from '../../../shared/schemas/findings';
import type { User } from './user';

/** One step in an event's decision history: the first decision, or a supervisor's reversal with its reason. */
export class FindingDecision extends Model<InferAttributes<FindingDecision>, InferCreationAttributes<FindingDecision>> {
  declare id: CreationOptional<number>;
  declare findingId: number;
  declare action: FindingDecisionAction;
  declare fromStatus: FindingStatus | null;
  declare toStatus: FindingStatus;
  declare kind: string;
  declare reason: string | null;
  declare decidedById: number;
  declare createdAt: CreationOptional<Date>;
  declare decidedBy?: NonAttribute<User>;
}

export function initFindingDecision(sequelize: Sequelize) {
  FindingDecision.init(
    {
      id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
      findingId: { type: DataTypes.INTEGER, allowNull: false },
      action: { type: DataTypes.STRING(12), allowNull: false },
      fromStatus: { type: DataTypes.STRING(12), allowNull: true },
      toStatus: { type: DataTypes.STRING(12), allowNull: false },
      kind: { type: DataTypes.STRING(40), allowNull: false },
      reason: { type: DataTypes.TEXT, allowNull: true },
      decidedById: { type: DataTypes.INTEGER, allowNull: false },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'finding_decisions', modelName: 'FindingDecision', underscored: true, updatedAt: false },
  );
}

export function associateFindingDecision(models: { User: typeof User }) {
  // createApp may run more than once in a process (tests); an alias can be declared only once.
  if (FindingDecision.associations.decidedBy) return;
  FindingDecision.belongsTo(models.User, { as: 'decidedBy', foreignKey: 'decidedById' });
}
