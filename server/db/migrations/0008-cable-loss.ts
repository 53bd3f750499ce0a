import { DataTypes, QueryTypes } from 'sequelize';
import type { Migration } from './index';

/**
 * Loss and dispersion in the cable library: attenuation at several frequencies
 * (JSON list), where those figures come from, the per-metre line constants with
 * skin and dielectric terms, and VFs measured at given pulse widths (JSON list).
 * An entry's earlier single attenuation figure becomes the first point of its list;
 * attenuation_db_per100m / attenuation_freq_mhz stay and repeat the list's lowest point.
 */
export const up: Migration = async ({ context: qi }) => {
  await qi.addColumn('cable_types', 'attenuation_points', { type: DataTypes.TEXT, allowNull: false, defaultValue: '[]' });
  await qi.addColumn('cable_types', 'loss_source', { type: DataTypes.TEXT, allowNull: true });
  for (const column of ['r_dc_ohm_per_m', 'skin_ohm_per_m_root_hz', 'l_h_per_m', 'c_f_per_m', 'g_s_per_m', 'loss_tangent']) {
    await qi.addColumn('cable_types', column, { type: DataTypes.DOUBLE, allowNull: true });
  }
  await qi.addColumn('cable_types', 'pulse_vfs', { type: DataTypes.TEXT, allowNull: false, defaultValue: '[]' });

  const rows = await qi.sequelize.query<{ id: number; a: number; f: number }>(
    'SELECT id, attenuation_db_per100m AS a, attenuation_freq_mhz AS f FROM cable_types WHERE attenuation_db_per100m IS NOT NULL AND attenuation_freq_mhz IS NOT NULL',
    { type: QueryTypes.SELECT },
  );
  for (const r of rows) {
    await qi.bulkUpdate(
      'cable_types',
      {
        attenuation_points: JSON.stringify([{ frequencyMhz: Number(r.f), dbPer100m: Number(r.a) }]),
        loss_source: 'Recorded before the library kept a source for loss figures',
      },
      { id: r.id },
    );
  }
};

export const down: Migration = async ({ context: qi }) => {
  for (const column of [
    'pulse_vfs',
    'loss_tangent',
    'g_s_per_m',
    'c_f_per_m',
    'l_h_per_m',
    'skin_ohm_per_m_root_hz',
    'r_dc_ohm_per_m',
    'loss_source',
    'attenuation_points',
  ]) {
    await qi.removeColumn('cable_types', column);
  }
};
