import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { previewImport } from '../../server/cables/cables.csv';
import { AppError } from '../../server/errors';
import { startApi, type Client, type TestApi } from './support/api';
import { foamPeRow, LIBRARY_CSV_HEADER } from './support/cables';

/**
 * A library file of the largest size taken (1 MiB) that is all delimiters or all rows costs the CSV reader seconds.
 * Read in one go on the thread that answers every request, it held everyone's sign-ins, uploads and pages for all
 * of that time. The reader takes turns with other work, stops at the first row past the limit, and says a file
 * that is nothing like a library in a few words.
 */

let api: TestApi;
let planner: Client;
beforeAll(async () => {
  api = await startApi();
  planner = await api.as('planner');
});
afterAll(() => api.close());

/** How many turns the event loop took while `work` ran, and how `work` ended. */
async function turnsDuring(work: () => Promise<unknown>) {
  let turns = 0;
  let counting = true;
  const tick = () => {
    if (!counting) return;
    turns++;
    setImmediate(tick);
  };
  setImmediate(tick);
  let outcome: unknown;
  try {
    outcome = await work();
  } catch (err) {
    outcome = err;
  } finally {
    counting = false;
  }
  return { turns, outcome };
}

describe('a hostile library file', () => {
  it('of a million empty header cells is read taking turns with other requests, and refused in a few words', async () => {
    const { turns, outcome } = await turnsDuring(() => previewImport(','.repeat(1_000_000)));
    // Read a slice at a time: 1 MB in 4 KiB slices gives the loop over two hundred turns; read in one go, none.
    expect(turns).toBeGreaterThan(200);
    expect(outcome).toBeInstanceOf(AppError);
    const err = outcome as AppError;
    expect(err.status).toBe(422);
    expect(err.message).toBe(
      'Line 1: the header has 1000001 columns; a library file has at most 20: name, construction, dielectric, z0_ohm, vf, vf_tolerance, attenuation_db_per_100m, attenuation_freq_mhz, vf_source, vf_reference, notes, attenuation_points, loss_source, r_dc_ohm_per_m, skin_ohm_per_m_root_hz, l_h_per_m, c_f_per_m, g_s_per_m, loss_tangent, pulse_vfs.',
    );
  });

  it('of half a million rows stops reading at the first row past the limit', async () => {
    const csv = `${LIBRARY_CSV_HEADER}\n${'x\n'.repeat(500_000)}`;
    const { turns, outcome } = await turnsDuring(() => previewImport(csv));
    // The limit is reached within the first slices; reading the whole megabyte took every one of its 245.
    expect(turns).toBeLessThan(20);
    expect((outcome as AppError).message).toBe('The file has more than 2000 rows; import at most 2000 at a time.');
  });

  it('names at most ten unknown columns', async () => {
    const header = `${LIBRARY_CSV_HEADER},${Array.from({ length: 12 }, (_, i) => `extra${i + 1}`).join(',')}`;
    const res = await planner
      .postRaw('/api/cables/import/preview')
      .attach('file', Buffer.from(`${header}\n${foamPeRow('Wide foam coax')}\n`, 'utf8'), { filename: 'wide.csv', contentType: 'text/csv' })
      .expect(422);
    expect(res.body.error.message).toMatch(/^Line 1: unknown columns "extra1", "extra2", "extra3", "extra4", "extra5", "extra6", "extra7", "extra8", "extra9", "extra10" and 2 more\. Needed: name, construction, dielectric, z0_ohm, vf, vf_tolerance, vf_source, vf_reference; the optional columns are in the import help\.$/);
    expect(res.body.error.message.length).toBeLessThanOrEqual(300);
  });

  it('still reads a whole file of 2000 rows across many slices, characters cut by a slice whole, each row on its own line', async () => {
    const rows = Array.from({ length: 2000 }, (_, i) => foamPeRow(`Sliced foam coax Ø–Ω ${String(i + 1).padStart(4, '0')}`));
    const preview = await previewImport([LIBRARY_CSV_HEADER, ...rows].join('\n'));
    expect(preview.counts).toEqual({ create: 2000, update: 0, unchanged: 0, invalid: 0 });
    expect(preview.rows[0]).toMatchObject({ line: 2, name: 'Sliced foam coax Ø–Ω 0001', action: 'create' });
    expect(preview.rows.every((r, i) => r.name === `Sliced foam coax Ø–Ω ${String(i + 1).padStart(4, '0')}`)).toBe(true);
    expect(preview.rows[1999]).toMatchObject({ line: 2001, name: 'Sliced foam coax Ø–Ω 2000', action: 'create' });
  });
});
