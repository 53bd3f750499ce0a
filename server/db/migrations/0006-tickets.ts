import { DataTypes } from 'sequelize';
import type { Migration } from './index';

/** Repair tickets raised from findings, their timeline, and the crews' close-outs. */
export const up: Migration = async ({ context: qi }) => {
  const users = { model: 'users', key: 'id' };
  await qi.createTable('tickets', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    title: { type: DataTypes.STRING(160), allowNull: false },
    site_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'sites', key: 'id' } },
    cable_run_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'cable_runs', key: 'id' } },
    status: { type: DataTypes.STRING(12), allowNull: false },
    priority: { type: DataTypes.STRING(10), allowNull: false },
    assignee_id: { type: DataTypes.INTEGER, allowNull: true, references: users },
    due_date: { type: DataTypes.DATEONLY, allowNull: true },
    notes: { type: DataTypes.TEXT, allowNull: true },
    created_by_id: { type: DataTypes.INTEGER, allowNull: false, references: users },
    closed_at: { type: DataTypes.DATE, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('tickets', ['status', 'priority'], { name: 'tickets_status_priority' });
  await qi.addIndex('tickets', ['assignee_id', 'status'], { name: 'tickets_assignee_status' });
  await qi.addIndex('tickets', ['site_id'], { name: 'tickets_site' });

  await qi.createTable('ticket_findings', {
    ticket_id: { type: DataTypes.INTEGER, allowNull: false, primaryKey: true, references: { model: 'tickets', key: 'id' }, onDelete: 'CASCADE' },
    finding_id: { type: DataTypes.INTEGER, allowNull: false, primaryKey: true, references: { model: 'findings', key: 'id' } },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('ticket_findings', ['finding_id'], { name: 'ticket_findings_finding' });

  await qi.createTable('ticket_events', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    ticket_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'tickets', key: 'id' }, onDelete: 'CASCADE' },
    actor_id: { type: DataTypes.INTEGER, allowNull: false, references: users },
    kind: { type: DataTypes.STRING(12), allowNull: false },
    from_status: { type: DataTypes.STRING(12), allowNull: true },
    to_status: { type: DataTypes.STRING(12), allowNull: true },
    comment: { type: DataTypes.TEXT, allowNull: true },
    changes: { type: DataTypes.TEXT, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('ticket_events', ['ticket_id', 'created_at'], { name: 'ticket_events_ticket_created' });

  await qi.createTable('ticket_closeouts', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    ticket_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'tickets', key: 'id' }, onDelete: 'CASCADE' },
    finding_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'findings', key: 'id' } },
    method: { type: DataTypes.STRING(10), allowNull: false },
    marker_id: { type: DataTypes.INTEGER, allowNull: true },
    marker_label: { type: DataTypes.STRING(60), allowNull: true },
    offset_m: { type: DataTypes.DOUBLE, allowNull: true },
    from_end: { type: DataTypes.STRING(1), allowNull: true },
    entered_distance_m: { type: DataTypes.DOUBLE, allowNull: true },
    measured_from: { type: DataTypes.STRING(1), allowNull: false },
    found_distance_m: { type: DataTypes.DOUBLE, allowNull: false },
    found_from_a_m: { type: DataTypes.DOUBLE, allowNull: false },
    found_chainage_m: { type: DataTypes.DOUBLE, allowNull: false },
    located_distance_m: { type: DataTypes.DOUBLE, allowNull: false },
    error_m: { type: DataTypes.DOUBLE, allowNull: false },
    round_trip_ns: { type: DataTypes.DOUBLE, allowNull: false },
    trace_vf: { type: DataTypes.DOUBLE, allowNull: false },
    implied_vf: { type: DataTypes.DOUBLE, allowNull: true },
    cable_type_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'cable_types', key: 'id' } },
    cause: { type: DataTypes.STRING(40), allowNull: false },
    work_done: { type: DataTypes.TEXT, allowNull: false },
    calibration_id: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'cable_calibrations', key: 'id' } },
    recorded_by_id: { type: DataTypes.INTEGER, allowNull: false, references: users },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('ticket_closeouts', ['ticket_id'], { name: 'ticket_closeouts_ticket' });
  await qi.addIndex('ticket_closeouts', ['cable_type_id'], { name: 'ticket_closeouts_cable_type' });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('ticket_closeouts');
  await qi.dropTable('ticket_events');
  await qi.dropTable('ticket_findings');
  await qi.dropTable('tickets');
};
