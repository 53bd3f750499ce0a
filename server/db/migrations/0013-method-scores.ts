import { DataTypes } from 'sequelize';
import type { Migration } from './index';

/**
 * Route markers may carry a coordinate (WGS 84 degrees, both or neither), so a
 * best location can be placed on the ground between them.
 *
 * At each close-out the found position is scored against every method's
 * estimate of that fault and against the best location itself: one row per
 * method, with its estimate and window as they stood, the found position, and
 * the miss along the cable, so located-vs-found can be read per method and per
 * cable type.
 */
export const up: Migration = async ({ context: qi }) => {
  await qi.addColumn('route_markers', 'latitude', { type: DataTypes.DOUBLE, allowNull: true });
  await qi.addColumn('route_markers', 'longitude', { type: DataTypes.DOUBLE, allowNull: true });

  await qi.createTable('method_scores', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    closeout_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'ticket_closeouts', key: 'id' } },
    ticket_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'tickets', key: 'id' } },
    finding_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'findings', key: 'id' } },
    cable_type_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'cable_types', key: 'id' } },
    measurement_id: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'measurements', key: 'id' } },
    method: { type: DataTypes.STRING(30), allowNull: false },
    label: { type: DataTypes.STRING(200), allowNull: false },
    from_end: { type: DataTypes.STRING(1), allowNull: false },
    used: { type: DataTypes.BOOLEAN, allowNull: false },
    located_from_a_m: { type: DataTypes.DOUBLE, allowNull: false },
    located_from_end_m: { type: DataTypes.DOUBLE, allowNull: false },
    standard_uncertainty_m: { type: DataTypes.DOUBLE, allowNull: false },
    window_start_m: { type: DataTypes.DOUBLE, allowNull: false },
    window_end_m: { type: DataTypes.DOUBLE, allowNull: false },
    found_from_a_m: { type: DataTypes.DOUBLE, allowNull: false },
    found_from_end_m: { type: DataTypes.DOUBLE, allowNull: false },
    error_m: { type: DataTypes.DOUBLE, allowNull: false },
    within_window: { type: DataTypes.BOOLEAN, allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('method_scores', ['closeout_id'], { name: 'method_scores_closeout' });
  await qi.addIndex('method_scores', ['method', 'cable_type_id'], { name: 'method_scores_method_type' });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('method_scores');
  await qi.removeColumn('route_markers', 'longitude');
  await qi.removeColumn('route_markers', 'latitude');
};
