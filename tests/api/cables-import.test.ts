import { parse } from 'csv-parse/sync';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import type { Transaction } from 'sequelize';
import { CableType, CableTypeChange } from '../../server/db/models';
import { startApi, type Client, type TestApi } from './support/api';

let api: TestApi;
let planner: Client;
beforeAll(async () => {
  api = await startApi();
  planner = await api.as('planner');
  await planner
    .post('/api/cables', {
      name: 'Existing PTFE coax',
      construction: 'coax',
      dielectric: 'PTFE',
      z0Ohm: 50,
      vf: 0.69,
      vfTolerance: 0.02,
      vfSource: 'handbook',
      vfReference: 'PTFE εr 2.1 → 0.69 (Standard Wire & Cable dielectric table)',
    })
    .expect(201);
});
afterAll(() => api.close());

const HEADER = 'name,construction,dielectric,z0_ohm,vf,vf_tolerance,attenuation_db_per_100m,attenuation_freq_mhz,vf_source,vf_reference,notes';
/** The same columns and a source for the loss figures, which an attenuation needs. */
const HEADER_WITH_SOURCE = `${HEADER},loss_source`;
const GOOD_1 = 'Import foam coax,coax,foamed polyethylene,75,0.82,0.03,,,handbook,"Foam PE coax 0.78–0.88, handbook range",,';
const BAD = 'Import bad pair,twisted-pair,PVC,-100,1.4,0.05,,,brochure,,,';
const GOOD_2 = 'Existing PTFE coax,coax,PTFE,50,0.695,0.02,12.5,100,datasheet,"Datasheet, 0.695 at 100 MHz","re-read",Datasheet loss table';

const upload = (url: string, csv: string, fields: Record<string, string> = {}) => {
  const req = planner.postRaw(url).attach('file', Buffer.from(csv, 'utf8'), { filename: 'library.csv', contentType: 'text/csv' });
  for (const [k, v] of Object.entries(fields)) req.field(k, v);
  return req;
};

async function libraryNames() {
  const res = await planner.get('/api/cables?pageSize=200').expect(200);
  return (res.body.items as Array<{ name: string }>).map((i) => i.name).sort();
}

describe('POST /api/cables/import/preview', () => {
  it('checks every row and lists the bad ones with line numbers and reasons, writing nothing', async () => {
    const before = await libraryNames();
    const res = await upload('/api/cables/import/preview', [HEADER_WITH_SOURCE, GOOD_1, BAD, GOOD_2].join('\n')).expect(200);
    expect(res.body.counts).toEqual({ create: 1, update: 1, unchanged: 0, invalid: 1 });
    expect(res.body.canCommit).toBe(false);
    const [r1, r2, r3] = res.body.rows;
    expect(r1).toMatchObject({ line: 2, name: 'Import foam coax', action: 'create', errors: [] });
    expect(r2).toMatchObject({ line: 3, action: 'invalid' });
    const issues = Object.fromEntries(r2.errors.map((e: { field: string; message: string; line: number }) => [e.field, `${e.line}: ${e.message}`]));
    expect(issues).toEqual({
      z0_ohm: '3: must be greater than 0 Ω',
      vf: '3: must be at most 1 (nothing is faster than light)',
      vf_source: '3: must be one of datasheet, handbook, calculated, field-calibrated',
      vf_reference: '3: is required',
    });
    expect(r3).toMatchObject({ line: 4, action: 'update', name: 'Existing PTFE coax' });
    expect(r3.changes).toEqual([
      { field: 'vf', from: 0.69, to: 0.695 },
      { field: 'vfSource', from: 'handbook', to: 'datasheet' },
      { field: 'vfReference', from: 'PTFE εr 2.1 → 0.69 (Standard Wire & Cable dielectric table)', to: 'Datasheet, 0.695 at 100 MHz' },
      { field: 'notes', from: null, to: 're-read' },
      // The one-point columns become a one-point list, recorded as the list.
      { field: 'attenuation', from: null, to: '100 MHz: 12.5 dB' },
      { field: 'lossSource', from: null, to: 'Datasheet loss table' },
    ]);
    expect(await libraryNames()).toEqual(before);
  });

  it('counts lines from the file, quoted line breaks included, and catches percentages, decimal commas and repeats', async () => {
    const csv = [
      HEADER,
      'Multi-line note coax,coax,PE,50,0.66,0.02,,,handbook,ref,"first line\nsecond line"',
      'Percent coax,coax,PE,50,66,0.02,,,handbook,ref,',
      'Comma coax,coax,PE,50,"0,66",0.02,,,handbook,ref,',
      'multi-line NOTE coax,coax,PE,50,0.66,0.02,,,handbook,ref,',
      'Short row,coax',
    ].join('\r\n');
    const res = await upload('/api/cables/import/preview', csv).expect(200);
    const byLine = Object.fromEntries(res.body.rows.map((r: { line: number; action: string; errors: Array<{ message: string }> }) => [r.line, [r.action, r.errors.map((e) => e.message).join('; ')]]));
    expect(byLine).toEqual({
      2: ['create', ''],
      4: ['invalid', '66 must be at most 1: write the VF as a fraction (0.66), not a percentage'],
      5: ['invalid', '"0,66" must be a number with a point for decimals'],
      6: ['invalid', 'appears again (first on line 2)'],
      7: ['invalid', 'has 2 fields, the header has 11'],
    });
  });

  it('refuses a file it cannot read, with where and why', async () => {
    const unknown = await upload('/api/cables/import/preview', 'name,colour\nx,red\n').expect(422);
    expect(unknown.body.error).toMatchObject({ code: 'csv_unreadable' });
    expect(unknown.body.error.message).toMatch(/^Line 1: unknown column "colour"/);
    // A near miss is answered with the column it most likely meant, and the message is whole, not cut short.
    const near = await upload('/api/cables/import/preview', 'name,z0,tolerance,vf\nx,50,0.02,0.66\n').expect(422);
    expect(near.body.error.message).toBe(
      'Line 1: unknown columns "z0" (perhaps "z0_ohm"), "tolerance" (perhaps "vf_tolerance"). Needed: name, construction, dielectric, z0_ohm, vf, vf_tolerance, vf_source, vf_reference; the optional columns are in the import help.',
    );
    const quote = await upload('/api/cables/import/preview', `${HEADER}\n"Open quote,coax\n`).expect(422);
    expect(quote.body.error.fields[0]).toMatchObject({ field: 'file', line: 2 });
    const none = await planner.post('/api/cables/import/preview', {}).expect(400);
    expect(none.body.error.fields).toEqual([{ field: 'file', message: 'is required' }]);
  });
});

describe('POST /api/cables/import', () => {
  it('writes nothing when a row in the middle is bad (all or nothing)', async () => {
    const before = await libraryNames();
    const beforePtfe = (await planner.get('/api/cables?q=Existing%20PTFE').expect(200)).body.items[0];
    const res = await upload('/api/cables/import', [HEADER_WITH_SOURCE, GOOD_1, BAD, GOOD_2].join('\n'), { reason: 'Yearly refresh' }).expect(422);
    expect(res.body.error.code).toBe('import_invalid');
    expect(res.body.error.message).toBe('Nothing was imported: 1 row has errors (line 3).');
    expect(res.body.error.fields.every((f: { line: number }) => f.line === 3)).toBe(true);
    expect(await libraryNames()).toEqual(before);
    const ptfe = (await planner.get('/api/cables?q=Existing%20PTFE').expect(200)).body.items[0];
    expect(ptfe).toEqual(beforePtfe);
    const h = await planner.get(`/api/cables/${ptfe.id}/history`).expect(200);
    expect(h.body).toHaveLength(1);
  });

  it('rolls back the rows already written when a later write fails', async () => {
    const before = await libraryNames();
    const csv = [HEADER, 'Rollback one,coax,PE,50,0.66,0.02,,,handbook,ref,', 'Rollback two,coax,PE,50,0.66,0.02,,,handbook,ref,'].join('\n');
    // The history write fails once a new entry is already in the library inside the import's transaction, however the
    // import writes its history (row by row, or many rows at once).
    const libraryBefore = await CableType.count();
    let failed = 0;
    const failOnceRowsAreIn = async (options: { transaction?: Transaction } | undefined) => {
      if (failed === 0 && (await CableType.count({ transaction: options?.transaction })) > libraryBefore) {
        failed += 1;
        throw new Error('disk full');
      }
    };
    const realCreate = CableTypeChange.create.bind(CableTypeChange);
    const realBulk = CableTypeChange.bulkCreate.bind(CableTypeChange);
    const one = vi.spyOn(CableTypeChange, 'create').mockImplementation((async (...args: Parameters<typeof realCreate>) => {
      await failOnceRowsAreIn(args[1] as { transaction?: Transaction });
      return realCreate(...args);
    }) as typeof CableTypeChange.create);
    const many = vi.spyOn(CableTypeChange, 'bulkCreate').mockImplementation((async (...args: Parameters<typeof realBulk>) => {
      await failOnceRowsAreIn(args[1] as { transaction?: Transaction });
      return realBulk(...args);
    }) as typeof CableTypeChange.bulkCreate);
    try {
      await upload('/api/cables/import', csv, { reason: 'Rollback check' }).expect(500);
    } finally {
      one.mockRestore();
      many.mockRestore();
    }
    expect(failed).toBe(1);
    expect(await libraryNames()).toEqual(before);
    expect(await CableType.count()).toBe(libraryBefore);
  });

  it('needs a reason, then writes every row with history', async () => {
    const csv = [HEADER_WITH_SOURCE, GOOD_1, GOOD_2].join('\n');
    const noReason = await upload('/api/cables/import', csv).expect(400);
    expect(noReason.body.error.fields[0].field).toBe('reason');
    const res = await upload('/api/cables/import', csv, { reason: 'Yearly refresh' }).expect(200);
    expect(res.body.counts).toEqual({ create: 1, update: 1, unchanged: 0, invalid: 0 });
    const ptfe = (await planner.get('/api/cables?q=Existing%20PTFE').expect(200)).body.items[0];
    expect(ptfe).toMatchObject({ vf: 0.695, vfSource: 'datasheet', revision: 2, attenuationDbPer100m: 12.5 });
    const h = await planner.get(`/api/cables/${ptfe.id}/history`).expect(200);
    expect(h.body[0]).toMatchObject({ kind: 'import', reason: 'Import of library.csv: Yearly refresh', changedBy: { name: 'Pat Plan' } });
    const again = await upload('/api/cables/import', csv, { reason: 'twice' }).expect(422);
    expect(again.body.error.code).toBe('import_empty');
  });

  it('is for planners and admins only', async () => {
    const tech = await api.as('technician');
    await tech.postRaw('/api/cables/import').attach('file', Buffer.from(HEADER), 'x.csv').expect(403);
  });
});

describe('loss columns', () => {
  const LOSS_HEADER = 'name,construction,dielectric,z0_ohm,vf,vf_tolerance,vf_source,vf_reference,attenuation_points,loss_source,r_dc_ohm_per_m,l_h_per_m,c_f_per_m,pulse_vfs';
  // 0.5 mm PE pair: attenuation typical of telephone-cable data (from memory); L and C from Z0 100 Ω and VF 0.66 (L = Z0/v, C = 1/(Z0·v)).
  const LOSSY =
    'Import lossy pair,twisted-pair,PE,100,0.66,0.03,handbook,ref,"10 MHz: 5.5 dB; 0.1 MHz: 0.55 dB; 1 MHz: 1.6",typical from memory,0.176,5.05e-7,5.05e-11,"1000 ns: 0.628 (yard test (long pulse)); 100 ns: 0.655 (yard test, drum 4)"';

  it('reads attenuation points and pulse-width VFs written as text, in any order', async () => {
    const res = await upload('/api/cables/import', [LOSS_HEADER, LOSSY].join('\n'), { reason: 'Loss figures' }).expect(200);
    expect(res.body.counts).toMatchObject({ create: 1, invalid: 0 });
    const pair = (await planner.get('/api/cables?q=Import%20lossy').expect(200)).body.items[0];
    expect(pair.attenuation).toEqual([
      { frequencyMhz: 0.1, dbPer100m: 0.55 },
      { frequencyMhz: 1, dbPer100m: 1.6 },
      { frequencyMhz: 10, dbPer100m: 5.5 },
    ]);
    expect(pair).toMatchObject({ attenuationDbPer100m: 0.55, attenuationFreqMhz: 0.1, lossSource: 'typical from memory', rDcOhmPerM: 0.176, lHPerM: 5.05e-7 });
    expect(pair.pulseVfs).toEqual([
      { pulseWidthNs: 100, vf: 0.655, source: 'yard test, drum 4' },
      { pulseWidthNs: 1000, vf: 0.628, source: 'yard test (long pulse)' },
    ]);
  });

  it('names the line and column of unreadable or incomplete loss cells', async () => {
    const rows = [
      'Bad points pair,twisted-pair,PE,100,0.66,0.03,handbook,ref,10 MHz 5.5 dB,src,,,,',
      'Bad pulse pair,twisted-pair,PE,100,0.66,0.03,handbook,ref,,,,,,500 ns: 0.64',
      'No source pair,twisted-pair,PE,100,0.66,0.03,handbook,ref,1 MHz: 1.6,,,,,',
      'Half constants pair,twisted-pair,PE,100,0.66,0.03,handbook,ref,,src,0.176,5.05e-7,,',
      'Exponent slip pair,twisted-pair,PE,100,0.66,0.03,handbook,ref,,src,0.176,5.05e-5,5.05e-11,',
    ];
    const res = await upload('/api/cables/import/preview', [LOSS_HEADER, ...rows].join('\n')).expect(200);
    const errors = res.body.rows.map((r: { errors: Array<{ field: string; line: number; message: string }> }) => r.errors);
    expect(errors[0]).toEqual([
      { field: 'attenuation_points', line: 2, message: 'point 1 "10 MHz 5.5 dB" is not "frequency MHz: attenuation dB" (e.g. "10 MHz: 6.8 dB")' },
    ]);
    expect(errors[1]).toEqual([{ field: 'pulse_vfs', line: 3, message: 'entry 1 "500 ns: 0.64" is not "width ns: VF (source)" (e.g. "500 ns: 0.64 (yard test)")' }]);
    expect(errors[2]).toEqual([{ field: 'loss_source', line: 4, message: 'is required with loss figures: say where they come from' }]);
    expect(errors[3]).toEqual([{ field: 'c_f_per_m', line: 5, message: 'is required with the other line constants' }]);
    // √(5.05e-5 / 5.05e-11) = 1000 Ω against the entry's 100 Ω.
    expect(errors[4]).toEqual([
      { field: 'l_h_per_m', line: 6, message: "with C gives Z0 = √(L/C) = 1.00e+3 Ω, far from the entry's 100 Ω: check the exponents" },
    ]);
  });

  it('keeps the stored loss figures when an older file has no loss columns', async () => {
    const before = (await planner.get('/api/cables?q=Import%20lossy').expect(200)).body.items[0];
    const old = `${HEADER}\nImport lossy pair,twisted-pair,PE,100,0.66,0.03,0.55,0.1,handbook,ref,Drum 4`;
    const res = await upload('/api/cables/import', old, { reason: 'Note the drum' }).expect(200);
    expect(res.body.rows[0].changes).toEqual([{ field: 'notes', from: null, to: 'Drum 4' }]);
    const after = (await planner.get('/api/cables?q=Import%20lossy').expect(200)).body.items[0];
    expect(after).toMatchObject({ attenuation: before.attenuation, pulseVfs: before.pulseVfs, lossSource: before.lossSource, revision: before.revision });
    // A one-point figure that is not one of the stored points would replace them unseen: refused.
    const clash = `${HEADER}\nImport lossy pair,twisted-pair,PE,100,0.66,0.03,9,100,handbook,ref,Drum 4`;
    const refused = await upload('/api/cables/import/preview', clash).expect(200);
    expect(refused.body.rows[0].errors).toEqual([
      { field: 'attenuation_db_per_100m', line: 2, message: 'is the one-point form of attenuation: give the points in attenuation, or make this one of them' },
    ]);
  });
});

describe('GET /api/cables/export', () => {
  it('writes the library as CSV that the import reads back unchanged', async () => {
    const tech = await api.as('technician');
    const res = await tech.get('/api/cables/export').expect(200);
    expect(res.headers['content-type']).toMatch(/^text\/csv/);
    expect(res.headers['content-disposition']).toMatch(/^attachment; filename="?cable-library-\d{4}-\d{2}-\d{2}\.csv"?$/);
    const rows = parse(res.text, { columns: true, bom: true }) as Array<Record<string, string>>;
    expect(Object.keys(rows[0])).toEqual([
      ...HEADER.split(','),
      'attenuation_points',
      'loss_source',
      'r_dc_ohm_per_m',
      'skin_ohm_per_m_root_hz',
      'l_h_per_m',
      'c_f_per_m',
      'g_s_per_m',
      'loss_tangent',
      'pulse_vfs',
    ]);
    expect(rows.find((r) => r.name === 'Import lossy pair')).toMatchObject({
      attenuation_db_per_100m: '0.55',
      attenuation_freq_mhz: '0.1',
      attenuation_points: '0.1 MHz: 0.55 dB; 1 MHz: 1.6 dB; 10 MHz: 5.5 dB',
      pulse_vfs: '100 ns: 0.655 (yard test, drum 4); 1000 ns: 0.628 (yard test (long pulse))',
      r_dc_ohm_per_m: '0.176',
      c_f_per_m: '5.05e-11',
    });
    expect(rows.find((r) => r.name === 'Import foam coax')).toMatchObject({ vf: '0.82', vf_reference: 'Foam PE coax 0.78–0.88, handbook range', notes: '' });
    const back = await upload('/api/cables/import/preview', res.text).expect(200);
    expect(back.body.counts).toEqual({ create: 0, update: 0, unchanged: rows.length, invalid: 0 });
  });
});
