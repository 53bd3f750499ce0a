import type { Migration } from './index';

/**
 * Indexes for every foreign key that had none, and for every sort and filter
 * the trace and finding lists offer, so a list page reads an index range
 * instead of scanning the table and sorting whole rows (analysis JSON and all).
 * Each sort index ends in the implicit row id, matching the lists' id tie-break.
 */
const INDEXES: Array<[name: string, table: string, columns: string[]]> = [
  // Trace list: archived traces are left out, so every list index starts with archived_at.
  ['traces_list_created', 'traces', ['archived_at', 'created_at']],
  ['traces_list_name', 'traces', ['archived_at', 'original_name']],
  ['traces_list_status', 'traces', ['archived_at', 'status']],
  ['traces_list_status_created', 'traces', ['archived_at', 'status', 'created_at']],
  ['traces_list_end', 'traces', ['archived_at', 'end']],
  ['traces_list_end_created', 'traces', ['archived_at', 'end', 'created_at']],
  ['traces_uploader_created', 'traces', ['uploaded_by_id', 'archived_at', 'created_at']],
  ['traces_run_created', 'traces', ['cable_run_id', 'archived_at', 'created_at']],
  // Finding list: each sort, and each filter with the default sort.
  ['findings_confirmed', 'findings', ['confirmed_at']],
  ['findings_distance', 'findings', ['distance_m']],
  ['findings_status', 'findings', ['status']],
  ['findings_status_confirmed', 'findings', ['status', 'confirmed_at']],
  ['findings_site_confirmed', 'findings', ['site_id', 'confirmed_at']],
  ['findings_run_confirmed', 'findings', ['cable_run_id', 'confirmed_at']],
  ['findings_confirmed_by', 'findings', ['confirmed_by_id']],
  // Text search reads these columns from the index, not from whole rows.
  ['findings_text', 'findings', ['note', 'kind', 'route_position_text']],
  // Foreign keys without an index of their own.
  ['cable_type_changes_changed_by', 'cable_type_changes', ['changed_by_id']],
  ['cable_calibrations_submitted_by', 'cable_calibrations', ['submitted_by_id']],
  ['cable_calibrations_reviewed_by', 'cable_calibrations', ['reviewed_by_id']],
  ['tickets_cable_run', 'tickets', ['cable_run_id']],
  ['tickets_created_by', 'tickets', ['created_by_id']],
  ['ticket_events_actor', 'ticket_events', ['actor_id']],
  ['ticket_closeouts_finding', 'ticket_closeouts', ['finding_id']],
  ['ticket_closeouts_calibration', 'ticket_closeouts', ['calibration_id']],
  ['ticket_closeouts_recorded_by', 'ticket_closeouts', ['recorded_by_id']],
  ['finding_decisions_decided_by', 'finding_decisions', ['decided_by_id']],
  ['measurements_recorded_by', 'measurements', ['recorded_by_id']],
  ['measurements_withdrawn_by', 'measurements', ['withdrawn_by_id']],
  ['trace_outcomes_calibration', 'trace_outcomes', ['calibration_id']],
  ['trace_outcomes_recorded_by', 'trace_outcomes', ['recorded_by_id']],
  ['trace_archive_events_by', 'trace_archive_events', ['by_id']],
  ['method_scores_ticket', 'method_scores', ['ticket_id']],
  ['method_scores_finding', 'method_scores', ['finding_id']],
  ['method_scores_cable_type', 'method_scores', ['cable_type_id']],
  ['method_scores_measurement', 'method_scores', ['measurement_id']],
];

export const up: Migration = async ({ context: qi }) => {
  const q = (id: string) => qi.quoteIdentifier(id);
  for (const [name, table, columns] of INDEXES) {
    await qi.sequelize.query(`CREATE INDEX IF NOT EXISTS ${q(name)} ON ${q(table)} (${columns.map(q).join(', ')})`);
  }
};

export const down: Migration = async ({ context: qi }) => {
  for (const [name] of [...INDEXES].reverse()) await qi.sequelize.query(`DROP INDEX IF EXISTS ${qi.quoteIdentifier(name)}`);
};
