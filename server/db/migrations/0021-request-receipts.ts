import { DataTypes } from 'sequelize';
import type { Migration } from './index';

/**
 * Creates that can be sent again safely: a finding, a measurement or a
 * close-out sent with an Idempotency-Key leaves one receipt per key and
 * user, written in the same transaction as the record it made. A repeat
 * under that key is answered from the receipt instead of making a second
 * record; the unique index is what makes two copies arriving together
 * end in one.
 */
export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('request_receipts', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    user_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'users', key: 'id' }, onDelete: 'CASCADE' },
    idempotency_key: { type: DataTypes.STRING(128), allowNull: false },
    action: { type: DataTypes.STRING(200), allowNull: false },
    body_sha256: { type: DataTypes.STRING(64), allowNull: false },
    status_code: { type: DataTypes.INTEGER, allowNull: false },
    resource_id: { type: DataTypes.INTEGER, allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('request_receipts', ['user_id', 'idempotency_key'], { name: 'request_receipts_user_key', unique: true });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('request_receipts');
};
