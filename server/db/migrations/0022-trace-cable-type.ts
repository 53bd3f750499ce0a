import { DataTypes } from 'sequelize';
import type { Migration } from './index';

/**
 * A trace names the cable type it was analysed as (`cable_type_id`), beside
 * that type's revision. A run can be given another cable type; a revision
 * alone, compared with another type's, said an analysis made with the old
 * type's VF was current. Rows written before this migration take their run's
 * cable type of now, the one their revision was read against until now.
 */
export const up: Migration = async ({ context: qi }) => {
  const q = (id: string) => qi.quoteIdentifier(id);
  await qi.addColumn('traces', 'cable_type_id', { type: DataTypes.INTEGER, allowNull: true });
  await qi.sequelize.query(
    `UPDATE ${q('traces')} SET ${q('cable_type_id')} = (SELECT ${q('cable_type_id')} FROM ${q('cable_runs')} WHERE ${q('cable_runs')}.${q('id')} = ${q('traces')}.${q('cable_run_id')})`,
  );
};

export const down: Migration = async ({ context: qi }) => {
  await qi.removeColumn('traces', 'cable_type_id');
};
