import { DataTypes } from 'sequelize';
import type { Migration } from './index';

/** A trace keeps what the phone made of its file before the upload (JSON), to show beside the server's analysis. */
export const up: Migration = async ({ context: qi }) => {
  await qi.addColumn('traces', 'device_analysis', { type: DataTypes.JSON, allowNull: true });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.removeColumn('traces', 'device_analysis');
};
