import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** A supervisor responsible for a site; they are told when a finding there is confirmed. */
export class SiteSupervisor extends Model<InferAttributes<SiteSupervisor>, InferCreationAttributes<SiteSupervisor>> {
  declare siteId: number;
  declare userId: number;
  declare createdAt: CreationOptional<Date>;
}

export function initSiteSupervisor(sequelize: Sequelize) {
  SiteSupervisor.init(
    {
      siteId: { type: DataTypes.INTEGER, allowNull: false, primaryKey: true },
      userId: { type: DataTypes.INTEGER, allowNull: false, primaryKey: true },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'site_supervisors', modelName: 'SiteSupervisor', underscored: true, updatedAt: false },
  );
}
