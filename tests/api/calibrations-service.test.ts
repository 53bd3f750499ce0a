import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ZodError } from 'zod';
import { submitCalibration } from '../../server/calibrations/calibrations.service';
import { CableType } from '../../server/db/models';
import { AppError } from '../../server/errors';
import { startApi, type TestApi } from './support/api';

let api: TestApi;
let cableTypeId: number;
beforeAll(async () => {
  api = await startApi();
  const c = await CableType.create({
    name: 'Service test solid PE coax',
    construction: 'coax',
    dielectric: 'solid polyethylene',
    z0Ohm: 50,
    vf: 0.66,
    vfTolerance: 0.02,
    attenuationDbPer100m: null,
    attenuationFreqMhz: null,
    vfSource: 'handbook',
    vfReference: 'test',
    notes: null,
  });
  cableTypeId = c.id;
});
afterAll(() => api.close());

describe('submitCalibration (the service the tickets feature calls)', () => {
  it('computes VF = 2L/(c·t) and stores it as pending', async () => {
    // 100 m at VF 0.66: t = 2·100 / (0.66 · 299 792 458) s = 1010.8 ns (arithmetic from the definition of c).
    const roundTripNs = (2 * 100) / (0.66 * 299_792_458) * 1e9;
    const cal = await submitCalibration({
      cableTypeId,
      knownLengthM: 100,
      roundTripNs,
      submittedById: api.users.technician.id,
      source: 'repair-closeout',
      note: 'ticket 12',
    });
    expect(cal.vf).toBeCloseTo(0.66, 10);
    expect(cal).toMatchObject({ status: 'pending', source: 'repair-closeout', libraryVf: 0.66, note: 'ticket 12', traceId: null });
    expect(cal.submittedBy).toEqual({ id: api.users.technician.id, name: 'Tess Tech' });
    expect(cal.cableType.name).toBe('Service test solid PE coax');
  });

  it('works inside a caller’s transaction', async () => {
    const cal = await api.app.ctx.sequelize.transaction((transaction) =>
      submitCalibration(
        { cableTypeId, knownLengthM: 50, roundTripNs: 500, submittedById: api.users.supervisor.id, source: 'manual' },
        transaction,
      ),
    );
    expect(cal.vf).toBeCloseTo((2 * 50) / (299_792_458 * 500e-9), 10);
  });

  it('refuses a VF above 1, a unit slip, an unknown cable type and bad numbers', async () => {
    const base = { cableTypeId, submittedById: api.users.technician.id, source: 'manual' as const };
    await expect(submitCalibration({ ...base, knownLengthM: 200, roundTripNs: 1000 })).rejects.toMatchObject({ status: 422, code: 'vf_not_physical' });
    await expect(submitCalibration({ ...base, knownLengthM: 100, roundTripNs: 1_010_800 })).rejects.toMatchObject({ status: 422, code: 'vf_implausible' });
    await expect(submitCalibration({ ...base, cableTypeId: 987654, knownLengthM: 100, roundTripNs: 1000 })).rejects.toBeInstanceOf(AppError);
    await expect(submitCalibration({ ...base, knownLengthM: -1, roundTripNs: 1000 })).rejects.toBeInstanceOf(ZodError);
  });
});
