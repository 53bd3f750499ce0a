import { DataTypes } from 'sequelize';
import type { Migration } from './index';

/**
 * Counts behind the sign-in and password-change limits, shared by every
 * instance on one PostgreSQL database (`rate_limit_hits`); and the re-analysis
 * of every trace of a cable type after its library values change: one row per
 * request (`cable_reanalyses`) and one per trace done (`cable_reanalysis_items`),
 * unique per request and trace so no trace is analysed into two results even
 * when a job is run again after its instance died.
 */
export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('rate_limit_hits', {
    key: { type: DataTypes.STRING(300), primaryKey: true },
    hits: { type: DataTypes.INTEGER, allowNull: false },
    reset_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('rate_limit_hits', ['reset_at'], { name: 'rate_limit_hits_reset' });

  await qi.createTable('cable_reanalyses', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    cable_type_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'cable_types', key: 'id' } },
    cable_type_revision: { type: DataTypes.INTEGER, allowNull: false },
    vf: { type: DataTypes.DOUBLE, allowNull: false },
    requested_by_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'users', key: 'id' } },
    status: { type: DataTypes.STRING(10), allowNull: false },
    trace_total: { type: DataTypes.INTEGER, allowNull: false },
    trace_ids: { type: DataTypes.JSON, allowNull: false },
    finished_at: { type: DataTypes.DATE, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('cable_reanalyses', ['cable_type_id', 'created_at'], { name: 'cable_reanalyses_type' });

  await qi.createTable('cable_reanalysis_items', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    reanalysis_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'cable_reanalyses', key: 'id' } },
    trace_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'traces', key: 'id' } },
    result_trace_id: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'traces', key: 'id' } },
    outcome: { type: DataTypes.STRING(12), allowNull: false },
    note: { type: DataTypes.STRING(300), allowNull: true },
    findings: { type: DataTypes.INTEGER, allowNull: false },
    findings_moved: { type: DataTypes.INTEGER, allowNull: false },
    findings_unmatched: { type: DataTypes.INTEGER, allowNull: false },
    max_shift_m: { type: DataTypes.DOUBLE, allowNull: true },
    sum_shift_m: { type: DataTypes.DOUBLE, allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('cable_reanalysis_items', ['reanalysis_id', 'trace_id'], { name: 'cable_reanalysis_items_once', unique: true });
  await qi.addIndex('cable_reanalysis_items', ['trace_id'], { name: 'cable_reanalysis_items_trace' });
  await qi.addIndex('cable_reanalysis_items', ['result_trace_id'], { name: 'cable_reanalysis_items_result' });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('cable_reanalysis_items');
  await qi.dropTable('cable_reanalyses');
  await qi.dropTable('rate_limit_hits');
};
