import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableCalibration, CableType } from '../../server/db/models';
import { makeRun } from './support/field-fixtures';
import { startApi, type TestApi } from './support/api';

let api: TestApi;
let cableId: number;

beforeAll(async () => {
  api = await startApi();
  cableId = (await makeRun('Proposal run')).cable.id;
});
afterAll(() => api.close());

describe('POST /api/calibrations/:id/accept with the proposed mean and tolerance', () => {
  it('stores the VF and tolerance the planner confirmed, and says the VF is a mean', async () => {
    const tech = await api.as('technician');
    const planner = await api.as('planner');
    // 100 m in 1010.8 ns round trip → VF = 2L/(c·t) = 0.6600 (PE coax, "about 10 ns per metre there and back", common practice).
    const filed = await tech.post('/api/calibrations', { cableTypeId: cableId, knownLengthM: 100, roundTripNs: 1010.8 }).expect(201);

    const bad = await planner.post(`/api/calibrations/${filed.body.id}/accept`, { vf: 1.2 }).expect(400);
    expect(bad.body.error.fields).toEqual([{ field: 'vf', message: 'must be at most 1 (nothing is faster than light)' }]);
    expect((await CableCalibration.findByPk(filed.body.id))!.status).toBe('pending');

    const res = await planner.post(`/api/calibrations/${filed.body.id}/accept`, { vf: 0.6612, vfTolerance: 0.012 }).expect(200);
    expect(res.body.cable.vf).toBe(0.6612);
    expect(res.body.cable.vfTolerance).toBe(0.012);
    const cable = await CableType.findByPk(cableId);
    expect([cable!.vf, cable!.vfTolerance, cable!.vfSource]).toEqual([0.6612, 0.012, 'field-calibrated']);
    expect(cable!.vfReference).toMatch(new RegExp(`^Mean of the accepted field calibrations of this cable type, the last #${filed.body.id}: 100 m known length`));

    const stats = await planner.get(`/api/cables/${cableId}/calibrations`).expect(200);
    expect(stats.body.acceptedStats.count).toBe(1);
    expect(stats.body.acceptedStats.mean).toBeCloseTo(0.66, 3);
  });

  it('keeps the calibration’s own VF when no VF is given', async () => {
    const tech = await api.as('technician');
    const planner = await api.as('planner');
    // 100 m in 1000 ns → VF = 200/(c·1e-6) = 0.66713 → 0.6671 at the library's four decimals.
    const filed = await tech.post('/api/calibrations', { cableTypeId: cableId, knownLengthM: 100, roundTripNs: 1000 }).expect(201);
    const res = await planner.post(`/api/calibrations/${filed.body.id}/accept`, {}).expect(200);
    expect(res.body.cable.vf).toBe(0.6671);
    expect(res.body.cable.vfTolerance).toBe(0.012);
    expect(res.body.cable.vfReference).toMatch(new RegExp(`^Field calibration #${filed.body.id}:`));
  });
});
