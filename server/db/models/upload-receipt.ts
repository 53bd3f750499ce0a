import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { CableEnd, DuplicateFile } from '../../../shared/schemas/traces';

/**
 * What one upload, named by its idempotency key, recorded: the traces it
 * stored (in file order) and the files it found already stored. A retry with
 * the same key is answered from here instead of storing the files again.
 */
export class UploadReceipt extends Model<InferAttributes<UploadReceipt>, InferCreationAttributes<UploadReceipt>> {
  declare id: CreationOptional<number>;
  declare userId: number;
  declare idempotencyKey: string;
  declare cableRunId: number;
  declare end: CableEnd;
  declare traceIds: number[];
  declare duplicates: DuplicateFile[];
  declare createdAt: CreationOptional<Date>;
}

export function initUploadReceipt(sequelize: Sequelize) {
  UploadReceipt.init(
    {
      id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
      userId: { type: DataTypes.INTEGER, allowNull: false },
      idempotencyKey: { type: DataTypes.STRING(128), allowNull: false },
      cableRunId: { type: DataTypes.INTEGER, allowNull: false },
      end: { type: DataTypes.STRING(1), allowNull: false },
      traceIds: { type: DataTypes.JSON, allowNull: false },
      duplicates: { type: DataTypes.JSON, allowNull: false },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'upload_receipts', modelName: 'UploadReceipt', underscored: true, updatedAt: false },
  );
}
