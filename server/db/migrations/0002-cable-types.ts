import { DataTypes } from 'sequelize';
import type { Migration } from './index';

export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('cable_types', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    name: { type: DataTypes.STRING(120), allowNull: false, unique: true },
    construction: { type: DataTypes.STRING(20), allowNull: false },
    dielectric: { type: DataTypes.STRING(120), allowNull: false },
    z0_ohm: { type: DataTypes.DOUBLE, allowNull: false },
    vf: { type: DataTypes.DOUBLE, allowNull: false },
    vf_tolerance: { type: DataTypes.DOUBLE, allowNull: false },
    attenuation_db_per100m: { type: DataTypes.DOUBLE, allowNull: true },
    attenuation_freq_mhz: { type: DataTypes.DOUBLE, allowNull: true },
    vf_source: { type: DataTypes.STRING(20), allowNull: false },
    vf_reference: { type: DataTypes.TEXT, allowNull: false },
    notes: { type: DataTypes.TEXT, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('cable_types');
};
