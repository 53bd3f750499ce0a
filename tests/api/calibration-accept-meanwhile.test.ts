import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableCalibration, CableType, CableTypeChange } from '../../server/db/models';
import { solidPePair } from './support/cables';
import { startApi, type TestApi } from './support/api';

// Two planners each accepting a different field calibration of one cable type, both forms opened before either
// accepted. Each form proposes the mean of the calibrations accepted so far with its own one added; the second
// to be stored would set the library VF to a mean that leaves out the calibration the first just accepted, and
// the list would say both are accepted. A form that says what it started from (basedOn) is refused instead.

const C = 299_792_458; // m/s, exact (SI definition of the metre)
const roundTripNs = (lengthM: number, vf: number) => ((2 * lengthM) / (vf * C)) * 1e9;

let api: TestApi;
beforeAll(async () => {
  api = await startApi();
});
afterAll(() => api.close());

async function cableWithTwoCalibrations(name: string) {
  const planner = await api.as('planner');
  const tech = await api.as('technician');
  const { body: cable } = await planner.post('/api/cables', solidPePair(name)).expect(201);
  const file = async (vf: number) =>
    (
      await tech
        .post('/api/calibrations', { cableTypeId: cable.id, knownLengthM: 300, roundTripNs: roundTripNs(300, vf) })
        .expect(201)
    ).body as { id: number };
  return { cable: cable as { id: number }, low: await file(0.64), high: await file(0.68) };
}

describe('accepting a calibration from a form opened before another was accepted', () => {
  it('is refused with 409 naming the calibration accepted meanwhile, and nothing is stored', async () => {
    const { cable, low, high } = await cableWithTwoCalibrations('Meanwhile PE pair');
    const first = await api.as('planner');
    const second = await api.as('planner');
    // Both forms opened now: nothing accepted yet, the library at 0.66 ± 3 %.
    const opened = (await first.get(`/api/cables/${cable.id}/calibrations`).expect(200)).body;
    expect([opened.acceptedStats.count, opened.libraryVf, opened.libraryVfTolerance]).toEqual([0, 0.66, 0.03]);
    const basedOn = { vf: opened.libraryVf, vfTolerance: opened.libraryVfTolerance, acceptedCount: opened.acceptedStats.count };

    // The single-calibration proposal: its own VF, ±2 % (common practice for one known-length calibration).
    await second.post(`/api/calibrations/${high.id}/accept`, { vf: 0.68, vfTolerance: 0.02, basedOn }).expect(200);
    const late = await first.post(`/api/calibrations/${low.id}/accept`, { vf: 0.64, vfTolerance: 0.02, basedOn }).expect(409);
    expect(late.body.error.code).toBe('changed_meanwhile');
    expect(late.body.error.message).toContain(`calibration #${high.id}`);
    expect(late.body.error.fields).toEqual([
      {
        field: 'vf',
        message: `the proposal leaves out calibration #${high.id}, accepted after you opened the form: 1 calibration is accepted now, you started from 0`,
      },
    ]);
    expect((await CableCalibration.findByPk(low.id))!.status).toBe('pending');
    expect((await CableType.findByPk(cable.id))!.vf).toBe(0.68);
    expect(await CableTypeChange.count({ where: { calibrationId: low.id } })).toBe(0);

    // Opened again, the proposal is the mean of both: (0.64 + 0.68) / 2 = 0.66.
    const again = (await first.get(`/api/cables/${cable.id}/calibrations`).expect(200)).body;
    expect(again.acceptedStats.count).toBe(1);
    await first
      .post(`/api/calibrations/${low.id}/accept`, {
        vf: 0.66,
        vfTolerance: 0.02,
        basedOn: { vf: again.libraryVf, vfTolerance: again.libraryVfTolerance, acceptedCount: 1 },
      })
      .expect(200);
    expect((await CableType.findByPk(cable.id))!.vf).toBe(0.66);
  });

  it('is refused with 409 where the library VF was changed by hand meanwhile', async () => {
    const { cable, low } = await cableWithTwoCalibrations('Hand-edited PE pair');
    const reviewer = await api.as('planner');
    const editor = await api.as('planner');
    const opened = (await reviewer.get(`/api/cables/${cable.id}/calibrations`).expect(200)).body;
    await editor
      .patch(`/api/cables/${cable.id}`, { vf: 0.67, reason: 'Maker’s data sheet, second issue', basedOn: { vf: 0.66 } })
      .expect(200);
    const late = await reviewer
      .post(`/api/calibrations/${low.id}/accept`, {
        vf: 0.64,
        basedOn: { vf: opened.libraryVf, vfTolerance: opened.libraryVfTolerance, acceptedCount: 0 },
      })
      .expect(409);
    expect(late.body.error.code).toBe('changed_meanwhile');
    expect(late.body.error.fields).toEqual([{ field: 'vf', message: 'is now 0.67; you started from 0.66' }]);
    expect((await CableCalibration.findByPk(low.id))!.status).toBe('pending');
    expect((await CableType.findByPk(cable.id))!.vf).toBe(0.67);
  });

  it('takes one of two forms accepted at the same moment and refuses the other with 409', async () => {
    const { cable, low, high } = await cableWithTwoCalibrations('Side-by-side PE pair');
    const a = await api.as('planner');
    const b = await api.as('planner');
    const basedOn = { vf: 0.66, vfTolerance: 0.03, acceptedCount: 0 };
    const answers = await Promise.all([
      a.post(`/api/calibrations/${low.id}/accept`, { vf: 0.64, basedOn }),
      b.post(`/api/calibrations/${high.id}/accept`, { vf: 0.68, basedOn }),
    ]);
    expect(answers.map((r) => r.status).sort()).toEqual([200, 409]);
    const taken = answers[0].status === 200 ? { cal: low, vf: 0.64 } : { cal: high, vf: 0.68 };
    expect(await CableCalibration.count({ where: { cableTypeId: cable.id, status: 'accepted' } })).toBe(1);
    expect((await CableCalibration.findByPk(taken.cal.id))!.status).toBe('accepted');
    expect((await CableType.findByPk(cable.id))!.vf).toBe(taken.vf);
  });

  it('refuses a starting point that is not a count', async () => {
    const { low } = await cableWithTwoCalibrations('Bad snapshot PE pair');
    const planner = await api.as('planner');
    const res = await planner
      .post(`/api/calibrations/${low.id}/accept`, { vf: 0.64, basedOn: { vf: 0.66, vfTolerance: 0.03, acceptedCount: -1 } })
      .expect(400);
    expect(res.body.error.fields).toEqual([{ field: 'basedOn.acceptedCount', message: 'must be at least 0' }]);
  });
});

describe('a cable type with more calibrations than the list shows', () => {
  it('counts every one, so the count a form sends back matches', async () => {
    const { cable, low } = await cableWithTwoCalibrations('Much calibrated PE pair');
    const submittedById = api.users.technician.id;
    // 520 accepted before: more than the 500 newest the list holds.
    await CableCalibration.bulkCreate(
      Array.from({ length: 520 }, (_, i) => ({
        cableTypeId: cable.id,
        knownLengthM: 300,
        roundTripNs: roundTripNs(300, i % 2 ? 0.65 : 0.67),
        vf: i % 2 ? 0.65 : 0.67,
        libraryVf: 0.66,
        source: 'manual' as const,
        traceId: null,
        note: null,
        status: 'accepted' as const,
        submittedById,
        reviewedById: api.users.planner.id,
        reviewedAt: new Date(),
        reviewReason: null,
      })),
    );
    const planner = await api.as('planner');
    const opened = (await planner.get(`/api/cables/${cable.id}/calibrations`).expect(200)).body;
    expect(opened.items).toHaveLength(500);
    expect(opened.counts).toEqual({ pending: 2, accepted: 520, rejected: 0 });
    // Mean of 260 at 0.65 and 260 at 0.67 is 0.66 (arithmetic).
    expect(opened.acceptedStats.count).toBe(520);
    expect(opened.acceptedStats.mean).toBeCloseTo(0.66, 9);
    await planner
      .post(`/api/calibrations/${low.id}/accept`, {
        vf: 0.66,
        basedOn: { vf: opened.libraryVf, vfTolerance: opened.libraryVfTolerance, acceptedCount: opened.acceptedStats.count },
      })
      .expect(200);
  });
});
