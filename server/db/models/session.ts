import { DataTypes, Model, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** The table behind connect-session-sequelize, with the user id kept so sessions can be ended per user. */
export class Session extends Model<InferAttributes<Session>, InferCreationAttributes<Session>> {
  declare sid: string;
  declare expires: Date | null;
  declare data: string;
  declare userId: number | null;
}

export function initSession(sequelize: Sequelize) {
  Session.init(
    {
      sid: { type: DataTypes.STRING(64), primaryKey: true },
      expires: { type: DataTypes.DATE, allowNull: true },
      data: { type: DataTypes.TEXT, allowNull: false },
      userId: { type: DataTypes.INTEGER, allowNull: true, field: 'user_id' },
    },
    { sequelize, tableName: 'sessions', modelName: 'Session', underscored: true },
  );
}
