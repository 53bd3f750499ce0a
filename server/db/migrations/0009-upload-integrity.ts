import { DataTypes } from 'sequelize';
import type { Migration } from './index';

/**
 * Uploads that can be retried and cleaned up safely: one receipt per
 * idempotency key and user (a retried upload gets the first answer), an
 * index to find the same bytes on the same run and end, and indexes on the
 * traces' remaining foreign key and on the list's default sort.
 */
export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('upload_receipts', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    user_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'users', key: 'id' }, onDelete: 'CASCADE' },
    idempotency_key: { type: DataTypes.STRING(128), allowNull: false },
    cable_run_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'cable_runs', key: 'id' }, onDelete: 'CASCADE' },
    end: { type: DataTypes.STRING(1), allowNull: false },
    trace_ids: { type: DataTypes.JSON, allowNull: false },
    duplicates: { type: DataTypes.JSON, allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('upload_receipts', ['user_id', 'idempotency_key'], { name: 'upload_receipts_user_key', unique: true });
  await qi.addIndex('upload_receipts', ['cable_run_id'], { name: 'upload_receipts_cable_run' });
  await qi.addIndex('traces', ['reanalysis_of_id'], { name: 'traces_reanalysis_of' });
  await qi.addIndex('traces', ['sha256', 'cable_run_id', 'end'], { name: 'traces_sha256_run_end' });
  await qi.addIndex('traces', ['created_at'], { name: 'traces_created' });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.removeIndex('traces', 'traces_created');
  await qi.removeIndex('traces', 'traces_sha256_run_end');
  await qi.removeIndex('traces', 'traces_reanalysis_of');
  await qi.dropTable('upload_receipts');
};
