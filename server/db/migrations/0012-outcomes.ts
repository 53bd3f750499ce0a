import { DataTypes } from 'sequelize';
import type { Migration } from './index';

/**
 * What a trace ended as besides a fault: the far end read on a healthy cable
 * (the run's measured length), a calibration filed from it; and archiving a
 * junk or unreadable trace: `traces.archived_at` hides it from the lists
 * (nothing is deleted) and every archive and restore is a history row with
 * who, when and why.
 */
export const up: Migration = async ({ context: qi }) => {
  const users = { model: 'users', key: 'id' };
  await qi.createTable('trace_outcomes', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    trace_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'traces', key: 'id' } },
    cable_run_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'cable_runs', key: 'id' } },
    kind: { type: DataTypes.STRING(30), allowNull: false },
    event_index: { type: DataTypes.INTEGER, allowNull: false },
    measured_length_m: { type: DataTypes.DOUBLE, allowNull: false },
    window_start_m: { type: DataTypes.DOUBLE, allowNull: false },
    window_end_m: { type: DataTypes.DOUBLE, allowNull: false },
    installed_length_m: { type: DataTypes.DOUBLE, allowNull: false },
    vf: { type: DataTypes.DOUBLE, allowNull: false },
    calibration_id: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'cable_calibrations', key: 'id' } },
    note: { type: DataTypes.TEXT, allowNull: true },
    recorded_by_id: { type: DataTypes.INTEGER, allowNull: false, references: users },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('trace_outcomes', ['trace_id'], { name: 'trace_outcomes_trace' });
  await qi.addIndex('trace_outcomes', ['cable_run_id', 'kind'], { name: 'trace_outcomes_run_kind' });

  await qi.addColumn('traces', 'archived_at', { type: DataTypes.DATE, allowNull: true });
  await qi.addIndex('traces', ['archived_at'], { name: 'traces_archived' });
  await qi.createTable('trace_archive_events', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    trace_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'traces', key: 'id' } },
    action: { type: DataTypes.STRING(10), allowNull: false },
    reason: { type: DataTypes.TEXT, allowNull: false },
    by_id: { type: DataTypes.INTEGER, allowNull: false, references: users },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('trace_archive_events', ['trace_id'], { name: 'trace_archive_events_trace' });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('trace_archive_events');
  await qi.removeIndex('traces', 'traces_archived');
  await qi.removeColumn('traces', 'archived_at');
  await qi.dropTable('trace_outcomes');
};
