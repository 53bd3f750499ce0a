import { DataTypes } from 'sequelize';
import type { Migration } from './index';

/**
 * The field workflow: sites and the supervisors responsible for them, cable
 * runs with their route markers, uploaded traces and the findings made from
 * them. Distances are metres; JSON columns hold the engine's result as-is.
 */
export const up: Migration = async ({ context: qi }) => {
  const stamps = {
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  };
  const users = { model: 'users', key: 'id' };

  await qi.createTable('sites', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    name: { type: DataTypes.STRING(120), allowNull: false, unique: true },
    address: { type: DataTypes.STRING(300), allowNull: true },
    latitude: { type: DataTypes.DOUBLE, allowNull: true },
    longitude: { type: DataTypes.DOUBLE, allowNull: true },
    access_notes: { type: DataTypes.TEXT, allowNull: true },
    ...stamps,
  });

  await qi.createTable('site_supervisors', {
    site_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      primaryKey: true,
      references: { model: 'sites', key: 'id' },
      onDelete: 'CASCADE',
    },
    user_id: { type: DataTypes.INTEGER, allowNull: false, primaryKey: true, references: users, onDelete: 'CASCADE' },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('site_supervisors', ['user_id'], { name: 'site_supervisors_user' });

  await qi.createTable('cable_runs', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    site_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'sites', key: 'id' } },
    name: { type: DataTypes.STRING(120), allowNull: false },
    cable_type_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'cable_types', key: 'id' } },
    end_a_label: { type: DataTypes.STRING(120), allowNull: false },
    end_b_label: { type: DataTypes.STRING(120), allowNull: false },
    installed_length_m: { type: DataTypes.DOUBLE, allowNull: false },
    notes: { type: DataTypes.TEXT, allowNull: true },
    ...stamps,
  });
  await qi.addIndex('cable_runs', ['site_id', 'name'], { name: 'cable_runs_site_name', unique: true });
  await qi.addIndex('cable_runs', ['cable_type_id'], { name: 'cable_runs_cable_type' });

  await qi.createTable('route_markers', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    cable_run_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'cable_runs', key: 'id' },
      onDelete: 'CASCADE',
    },
    label: { type: DataTypes.STRING(60), allowNull: false },
    kind: { type: DataTypes.STRING(20), allowNull: false },
    chainage_m: { type: DataTypes.DOUBLE, allowNull: false },
    slack_m: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
    notes: { type: DataTypes.TEXT, allowNull: true },
    ...stamps,
  });
  await qi.addIndex('route_markers', ['cable_run_id', 'chainage_m'], { name: 'route_markers_run_chainage' });

  await qi.createTable('traces', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    cable_run_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'cable_runs', key: 'id' } },
    end: { type: DataTypes.STRING(1), allowNull: false },
    uploaded_by_id: { type: DataTypes.INTEGER, allowNull: false, references: users },
    original_name: { type: DataTypes.STRING(255), allowNull: false },
    raw_path: { type: DataTypes.STRING(500), allowNull: false },
    sha256: { type: DataTypes.STRING(64), allowNull: false },
    size_bytes: { type: DataTypes.INTEGER, allowNull: false },
    status: { type: DataTypes.STRING(10), allowNull: false },
    error_code: { type: DataTypes.STRING(40), allowNull: true },
    error_message: { type: DataTypes.TEXT, allowNull: true },
    error_line: { type: DataTypes.INTEGER, allowNull: true },
    error_field: { type: DataTypes.STRING(120), allowNull: true },
    settings: { type: DataTypes.JSON, allowNull: false },
    vf: { type: DataTypes.DOUBLE, allowNull: false },
    vf_tolerance: { type: DataTypes.DOUBLE, allowNull: false },
    z0_ohm: { type: DataTypes.DOUBLE, allowNull: true },
    vf_override_reason: { type: DataTypes.TEXT, allowNull: true },
    cable_type_revision: { type: DataTypes.INTEGER, allowNull: true },
    engine_version: { type: DataTypes.STRING(20), allowNull: false },
    analysis: { type: DataTypes.JSON, allowNull: true },
    is_reference: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    ...stamps,
  });
  await qi.addIndex('traces', ['cable_run_id', 'end', 'created_at'], { name: 'traces_run_end_created' });
  await qi.addIndex('traces', ['uploaded_by_id'], { name: 'traces_uploaded_by' });
  await qi.addIndex('traces', ['status'], { name: 'traces_status' });

  await qi.createTable('findings', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    site_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'sites', key: 'id' } },
    cable_run_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'cable_runs', key: 'id' } },
    trace_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'traces', key: 'id' } },
    event_index: { type: DataTypes.INTEGER, allowNull: false },
    kind: { type: DataTypes.STRING(40), allowNull: false },
    note: { type: DataTypes.TEXT, allowNull: true },
    round_trip_ns: { type: DataTypes.DOUBLE, allowNull: false },
    distance_m: { type: DataTypes.DOUBLE, allowNull: false },
    uncertainty_m: { type: DataTypes.DOUBLE, allowNull: false },
    window_start_m: { type: DataTypes.DOUBLE, allowNull: false },
    window_end_m: { type: DataTypes.DOUBLE, allowNull: false },
    distance_from_a_m: { type: DataTypes.DOUBLE, allowNull: false },
    route_position: { type: DataTypes.JSON, allowNull: true },
    route_position_text: { type: DataTypes.TEXT, allowNull: false },
    status: { type: DataTypes.STRING(12), allowNull: false },
    confirmed_by_id: { type: DataTypes.INTEGER, allowNull: false, references: users },
    confirmed_at: { type: DataTypes.DATE, allowNull: false },
    ...stamps,
  });
  await qi.addIndex('findings', ['trace_id', 'event_index'], { name: 'findings_trace_event', unique: true });
  await qi.addIndex('findings', ['site_id', 'status'], { name: 'findings_site_status' });
  await qi.addIndex('findings', ['cable_run_id'], { name: 'findings_cable_run' });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('findings');
  await qi.dropTable('traces');
  await qi.dropTable('route_markers');
  await qi.dropTable('cable_runs');
  await qi.dropTable('site_supervisors');
  await qi.dropTable('sites');
};
