import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/**
 * What one create sent with an Idempotency-Key made: which request it was
 * (`action`, and the SHA-256 of its body), the status it was answered with
 * and the record it made. A repeat under the same key is answered from here.
 */
export class RequestReceipt extends Model<InferAttributes<RequestReceipt>, InferCreationAttributes<RequestReceipt>> {
  declare id: CreationOptional<number>;
  declare userId: number;
  declare idempotencyKey: string;
  declare action: string;
  declare bodySha256: string;
  declare statusCode: number;
  declare resourceId: number;
  declare createdAt: CreationOptional<Date>;
}

export function initRequestReceipt(sequelize: Sequelize) {
  RequestReceipt.init(
    {
      id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
      userId: { type: DataTypes.INTEGER, allowNull: false },
      idempotencyKey: { type: DataTypes.STRING(128), allowNull: false },
      action: { type: DataTypes.STRING(200), allowNull: false },
      bodySha256: { type: DataTypes.STRING(64), allowNull: false },
      statusCode: { type: DataTypes.INTEGER, allowNull: false },
      resourceId: { type: DataTypes.INTEGER, allowNull: false },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'request_receipts', modelName: 'RequestReceipt', underscored: true, updatedAt: false },
  );
}
