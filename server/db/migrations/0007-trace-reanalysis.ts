import { DataTypes } from 'sequelize';
import type { Migration } from './index';

/** A re-analysis is a new trace row over the same stored file; it points back at the analysis it replaces. */
export const up: Migration = async ({ context: qi }) => {
  await qi.addColumn('traces', 'reanalysis_of_id', {
    type: DataTypes.INTEGER,
    allowNull: true,
    references: { model: 'traces', key: 'id' },
    onDelete: 'SET NULL',
  });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.removeColumn('traces', 'reanalysis_of_id');
};
