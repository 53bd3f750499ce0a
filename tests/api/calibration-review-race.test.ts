import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableCalibration, CableTypeChange } from '../../server/db/models';
import { solidPePair } from './support/cables';
import { startApi, type TestApi } from './support/api';

// Two planners deciding the same field calibration at the same moment, one accepting and one rejecting it (or
// both accepting): one decision stands and the other is refused. A calibration marked rejected whose VF was
// written into the library, or one accepted twice, would be a record that says the opposite of what happened.
// PostgreSQL runs the two transactions side by side.

const C = 299_792_458; // m/s, exact (SI definition of the metre)
const roundTripNs = (lengthM: number, vf: number) => ((2 * lengthM) / (vf * C)) * 1e9;

let api: TestApi;
beforeAll(async () => {
  api = await startApi();
});
afterAll(() => api.close());

describe('a calibration decided twice at once', () => {
  it('takes one decision and refuses the other with 409, and the library agrees with the one taken', async () => {
    const planner = await api.as('planner');
    const other = await api.as('planner');
    const tech = await api.as('technician');
    const { body: cable } = await planner
      .post('/api/cables', solidPePair('Race-calibrated PE pair', { vfReference: 'common practice' }))
      .expect(201);
    for (let round = 0; round < 6; round++) {
      const vf = 0.64 + 0.002 * round;
      const { body: cal } = await tech
        .post('/api/calibrations', { cableTypeId: cable.id, knownLengthM: 300, roundTripNs: roundTripNs(300, vf) })
        .expect(201);
      const both = round % 2 === 0;
      const [a, b] = await Promise.all([
        planner.post(`/api/calibrations/${cal.id}/accept`, { note: 'first reviewer' }),
        both
          ? other.post(`/api/calibrations/${cal.id}/accept`, { note: 'second reviewer' })
          : other.post(`/api/calibrations/${cal.id}/reject`, { reason: 'the length is a guess' }),
      ]);
      expect([a.status, b.status].sort()).toEqual([200, 409]);
      expect((a.status === 409 ? a : b).body.error.code).toBe('already_reviewed');
      const stored = (await CableCalibration.findByPk(cal.id))!;
      const written = await CableTypeChange.count({ where: { calibrationId: cal.id } });
      const now = (await planner.get(`/api/cables/${cable.id}`).expect(200)).body;
      if (stored.status === 'accepted') {
        expect(written).toBe(1);
        expect(now.vf).toBeCloseTo(vf, 4);
      } else {
        expect(stored.status).toBe('rejected');
        expect(written).toBe(0);
        expect(now.vfReference).not.toContain(`#${cal.id}:`);
      }
    }
  });
});
