import { DataTypes } from 'sequelize';
import type { Migration } from './index';

/**
 * Fault-location readings other than TDR traces (bridge loops, capacitance,
 * loop resistance), on a finding or a cable run. A correction is a new row that
 * points at the one it replaces; a withdrawal keeps the row with who, when and why.
 */
export const up: Migration = async ({ context: qi }) => {
  const users = { model: 'users', key: 'id' };
  await qi.createTable('measurements', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    cable_run_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'cable_runs', key: 'id' } },
    finding_id: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'findings', key: 'id' } },
    kind: { type: DataTypes.STRING(20), allowNull: false },
    readings: { type: DataTypes.JSON, allowNull: false },
    instrument: { type: DataTypes.STRING(200), allowNull: false },
    measured_at: { type: DataTypes.DATE, allowNull: false },
    note: { type: DataTypes.TEXT, allowNull: true },
    status: { type: DataTypes.STRING(10), allowNull: false },
    recorded_by_id: { type: DataTypes.INTEGER, allowNull: false, references: users },
    supersedes_id: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'measurements', key: 'id' } },
    change_reason: { type: DataTypes.TEXT, allowNull: true },
    withdrawn_by_id: { type: DataTypes.INTEGER, allowNull: true, references: users },
    withdrawn_at: { type: DataTypes.DATE, allowNull: true },
    withdraw_reason: { type: DataTypes.TEXT, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('measurements', ['finding_id', 'status'], { name: 'measurements_finding_status' });
  await qi.addIndex('measurements', ['cable_run_id', 'status'], { name: 'measurements_run_status' });
  await qi.addIndex('measurements', ['supersedes_id'], { name: 'measurements_supersedes' });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('measurements');
};
