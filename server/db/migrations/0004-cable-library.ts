import { DataTypes } from 'sequelize';
import type { Migration } from './index';

/**
 * The cable library's history and field calibrations, and the revision
 * counter on cable_types that traces compare against (see CableType.revision).
 * traces live in 0003; trace_id is kept without a foreign key so that this
 * migration does not depend on the field workflow's table layout.
 */
export const up: Migration = async ({ context: qi }) => {
  await qi.addColumn('cable_types', 'revision', { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 });

  await qi.createTable('cable_type_changes', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    cable_type_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'cable_types', key: 'id' },
      onDelete: 'CASCADE',
    },
    revision: { type: DataTypes.INTEGER, allowNull: false },
    kind: { type: DataTypes.STRING(20), allowNull: false },
    changed_by_id: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'users', key: 'id' }, onDelete: 'SET NULL' },
    reason: { type: DataTypes.TEXT, allowNull: false },
    changes: { type: DataTypes.TEXT, allowNull: false },
    calibration_id: { type: DataTypes.INTEGER, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('cable_type_changes', ['cable_type_id', 'revision'], { name: 'cable_type_changes_type_revision' });

  await qi.createTable('cable_calibrations', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    cable_type_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'cable_types', key: 'id' },
      onDelete: 'CASCADE',
    },
    known_length_m: { type: DataTypes.DOUBLE, allowNull: false },
    round_trip_ns: { type: DataTypes.DOUBLE, allowNull: false },
    vf: { type: DataTypes.DOUBLE, allowNull: false },
    library_vf: { type: DataTypes.DOUBLE, allowNull: false },
    source: { type: DataTypes.STRING(20), allowNull: false },
    trace_id: { type: DataTypes.INTEGER, allowNull: true },
    note: { type: DataTypes.TEXT, allowNull: true },
    status: { type: DataTypes.STRING(12), allowNull: false, defaultValue: 'pending' },
    submitted_by_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'users', key: 'id' } },
    reviewed_by_id: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'users', key: 'id' } },
    reviewed_at: { type: DataTypes.DATE, allowNull: true },
    review_reason: { type: DataTypes.TEXT, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('cable_calibrations', ['status', 'created_at'], { name: 'cable_calibrations_status_created' });
  await qi.addIndex('cable_calibrations', ['cable_type_id'], { name: 'cable_calibrations_cable_type' });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('cable_calibrations');
  await qi.dropTable('cable_type_changes');
  await qi.removeColumn('cable_types', 'revision');
};
