import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { hashPassword } from '../../server/auth/passwords';
import { Measurement, User } from '../../server/db/models';
import { MEASUREMENTS_LISTED } from '../../server/measurements/measurements.service';
import { makeRun, stepTraceCsv } from './support/field-fixtures';
import { startApi, TEST_PASSWORD, type TestApi } from './support/api';

let api: TestApi;
let fx: Awaited<ReturnType<typeof makeRun>>;

beforeAll(async () => {
  api = await startApi();
  fx = await makeRun('Fusion run'); // 200 m of solid-PE coax, VF 0.66 ± 2 %
});
afterAll(() => api.close());

async function confirmedFinding(end: 'A' | 'B', faultM: number) {
  const c = await api.as('technician');
  const up = await c
    .postRaw('/api/traces')
    .field('cableRunId', String(fx.run.id))
    .field('end', end)
    .attach('file', Buffer.from(stepTraceCsv({ faultM, vf: 0.66 })), `${end}-${faultM}.csv`)
    .expect(201);
  const trace = up.body.traces[0];
  const res = await c
    .post('/api/findings', { traceId: trace.id, eventIndex: 0, status: 'confirmed', kind: 'high-resistance' })
    .expect(201);
  return res.body;
}

/** Both conductors of the 200 m run: 16 mm² copper (IEC 60228 class 2, 1.15 Ω/km). */
const conductor = [{ lengthM: 200, material: 'copper', sizeMm2: 16 }];

function murray(findingId: number, ratio: number) {
  return {
    findingId,
    kind: 'murray',
    instrument: 'Loop bridge, serial HV-0042',
    measuredAt: '2026-03-02T10:15:00Z',
    readings: { fromEnd: 'A', ratio, faulty: conductor, temperatureC: 11 },
  };
}

describe('best location of a finding from traces at both ends and a bridge reading', () => {
  let fa: { id: number };
  let fb: { id: number };
  let measurementId: number;

  it('fuses the two-ended reading and the Murray loop into one location', async () => {
    // The fault 120 m from A: the trace from A sees it at 120 m, the one from B at 80 m.
    fa = await confirmedFinding('A', 120);
    fb = await confirmedFinding('B', 80);
    const tech = await api.as('technician');
    // Murray: 0.3 of a loop of two equal 200 m conductors = 0.3 × 400 = 120 m (hand-worked).
    const m = await tech.post('/api/measurements', murray(fa.id, 0.3)).expect(201);
    measurementId = m.body.id;
    expect(m.body.cableRunId).toBe(fx.run.id);
    expect(m.body.recordedBy.id).toBe(api.users.technician.id);
    expect(m.body.instrument).toBe('Loop bridge, serial HV-0042');
    expect(m.body.estimate.distanceFromAM).toBeCloseTo(120, 6);

    const res = await (await api.as('planner')).get(`/api/findings/${fa.id}`).expect(200);
    const best = res.body.bestLocation;
    expect(best.consistent).toBe(true);
    const byMethod = (method: string) => best.methods.filter((x: { method: string }) => x.method === method);
    // Two-ended: 200 × t_A/(t_A + t_B) = 120 m (hand-worked; the times are in proportion 120 : 80). Its uncertainty is
    // the installed length's, 1 % of 200 m = 2 m, times ∂d/∂L = t_A/(t_A + t_B) = 0.6 → 1.2 m.
    const [twoEnded] = byMethod('tdr-two-ended');
    expect(twoEnded.distanceFromAM).toBeCloseTo(120, 0);
    // The traces' own timing uncertainty adds to that in quadrature, so 1.2 m is the floor; the engine's
    // 95 % windows (now with loss-model and dispersion terms) keep the timing share under 1.2 m here.
    expect(twoEnded.standardUncertaintyM).toBeGreaterThanOrEqual(1.2);
    expect(twoEnded.standardUncertaintyM).toBeLessThan(Math.hypot(1.2, 1.2));
    expect(twoEnded.used).toBe(true);
    // Murray: 120 m with √((0.001/√12 × 400)² + (2 × 0.3 × 2)²) = √(0.1155² + 1.2²) = 1.2055 m (hand-worked).
    const [bridge] = byMethod('murray-loop');
    expect(bridge.distanceFromAM).toBeCloseTo(120, 6);
    expect(bridge.standardUncertaintyM).toBeCloseTo(1.2055, 3);
    expect(bridge.measurementId).toBe(measurementId);
    // The single-ended readings are shown but counted through the two-ended one.
    const singles = byMethod('tdr-single-ended');
    expect(singles.map((s: { findingId: number }) => s.findingId).sort()).toEqual([fa.id, fb.id].sort());
    expect(
      singles.every((s: { used: boolean; note: string }) => !s.used && s.note === 'counted through the two-ended reading'),
    ).toBe(true);
    // Both rest on the same installed length (1.2 m each, fully shared), so fusing them cannot go below that:
    // u ≈ 1.2 m, not the 1/√(1/1.2² + 1/1.2055²) = 0.85 m two independent readings would give.
    expect(best.distanceFromAM).toBeCloseTo(120, 0);
    expect(best.standardUncertaintyM).toBeGreaterThan(1.19);
    expect(best.standardUncertaintyM).toBeLessThanOrEqual(twoEnded.standardUncertaintyM + 1e-9);
    expect(best.windowStartM).toBeCloseTo(best.distanceFromAM - 2 * best.standardUncertaintyM, 9);
    expect(best.windowEndM).toBeCloseTo(best.distanceFromAM + 2 * best.standardUncertaintyM, 9);
    expect(best.test.degreesOfFreedom).toBe(1);
    // The window is narrower than the single-ended TDR window from A (120 m × 2 % = 2.4 m at least).
    const singleA = singles.find((s: { findingId: number }) => s.findingId === fa.id);
    expect(best.windowEndM - best.windowStartM).toBeLessThan(singleA.windowEndM - singleA.windowStartM);
    // Where to dig: 120 m of cable from A passes MH-1 (40 m, 2 m coiled) and MH-2 (80 m, 3 m coiled) → 115 m
    // along the route, 35 m past MH-2 toward P-7 (hand-worked, as in the findings tests).
    expect(best.routePosition.from.label).toBe('MH-2');
    expect(best.routePosition.offsetM).toBeCloseTo(35, 0);
    expect(best.routePositionText).toMatch(/^3\d\.\d m past manhole MH-2 toward pedestal P-7/);
    // The same fault seen from the finding at end B has the same best location.
    const fromB = await (await api.as('planner')).get(`/api/findings/${fb.id}`).expect(200);
    expect(fromB.body.bestLocation.distanceFromAM).toBeCloseTo(best.distanceFromAM, 9);
  });

  it('says the readings disagree when a corrected bridge reading stands off, and keeps the history', async () => {
    const tech = await api.as('technician');
    // Corrected to 0.2: 0.2 × 400 = 80 m, 40 m from the two-ended 120 m against a limit of about 1.96 × 0.12 m
    // (the shared length error cancels in their difference).
    const corrected = await tech
      .post(`/api/measurements/${measurementId}/corrections`, {
        ...murray(fa.id, 0.2),
        findingId: undefined,
        reason: 'read the wrong dial',
      })
      .expect(201);
    expect(corrected.body.history.map((h: { status: string }) => h.status)).toEqual(['corrected', 'active']);
    expect(corrected.body.measurement.supersedesId).toBe(measurementId);
    expect(corrected.body.measurement.changeReason).toBe('read the wrong dial');
    const best = (await (await api.as('planner')).get(`/api/findings/${fa.id}`).expect(200)).body.bestLocation;
    expect(best.consistent).toBe(false);
    expect(best.distanceFromAM).toBeNull();
    expect(best.windowStartM).toBeNull();
    expect(best.verdict).toMatch(/disagree/);
    expect(best.checks.length).toBeGreaterThan(0);
    const again = await tech.post(`/api/measurements/${measurementId}/corrections`, {
      ...murray(fa.id, 0.3),
      findingId: undefined,
      reason: 'again',
    });
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('not_active');

    // Another technician may not withdraw it; the one who took it may, with a reason, and the best location goes
    // back to the traces.
    const latest = corrected.body.measurement.id;
    await User.create({
      email: 'second.tech@example.com',
      name: 'Second Tech',
      role: 'technician',
      passwordHash: await hashPassword(TEST_PASSWORD),
    });
    const secondTech = await api.signIn('second.tech@example.com', TEST_PASSWORD);
    const notTheirs = await secondTech
      .post(`/api/measurements/${latest}/withdraw`, { reason: 'not mine to withdraw' })
      .expect(403);
    expect(notTheirs.body.error.code).toBe('forbidden');
    const noReason = await tech.post(`/api/measurements/${latest}/withdraw`, { reason: 'x' }).expect(400);
    expect(noReason.body.error.fields[0].field).toBe('reason');
    const other = await api.as('planner');
    const withdrawn = await tech
      .post(`/api/measurements/${latest}/withdraw`, { reason: 'bridge lead was on the wrong core' })
      .expect(200);
    expect(withdrawn.body.measurement.status).toBe('withdrawn');
    expect(withdrawn.body.measurement.withdrawnBy.id).toBe(api.users.technician.id);
    const after = (await other.get(`/api/findings/${fa.id}`).expect(200)).body.bestLocation;
    expect(after.consistent).toBe(true);
    expect(after.methods.some((x: { method: string }) => x.method === 'murray-loop')).toBe(false);
    const list = await other.get(`/api/measurements?findingId=${fa.id}&all=true`).expect(200);
    expect(list.body.map((x: { status: string }) => x.status)).toEqual(['corrected', 'withdrawn']);
    expect((await other.get(`/api/measurements?findingId=${fa.id}`).expect(200)).body).toEqual([]);
  });

  it('refuses readings that give no location, naming the field, and stores nothing', async () => {
    const tech = await api.as('technician');
    const ratio = await tech.post('/api/measurements', murray(fa.id, 1.2)).expect(422);
    expect(ratio.body.error.code).toBe('bad_reading');
    expect(ratio.body.error.fields[0].field).toBe('readings.ratio');
    expect(ratio.body.error.message).toMatch(/between 0 and 1/);
    // 0.6 of a loop of two equal conductors lies on the sound one.
    const beyond = await tech.post('/api/measurements', murray(fa.id, 0.6)).expect(422);
    expect(beyond.body.error.message).toMatch(/past the far end/);
    // 11 nF from a 10.4 nF cable (200 m at 52 pF/m).
    const cap = await tech
      .post('/api/measurements', {
        cableRunId: fx.run.id,
        kind: 'capacitance',
        instrument: 'Capacitance meter 7',
        readings: { fromEnd: 'A', measuredF: 11e-9, perMF: 52e-12 },
      })
      .expect(422);
    expect(cap.body.error.message).toMatch(/above the whole cable's 10\.40 nF/);
    const noInstrument = await tech.post('/api/measurements', { ...murray(fa.id, 0.3), instrument: '' }).expect(400);
    expect(noInstrument.body.error.fields[0].field).toBe('instrument');
    const future = await tech
      .post('/api/measurements', { ...murray(fa.id, 0.3), measuredAt: '2999-01-01T00:00:00Z' })
      .expect(422);
    expect(future.body.error.fields[0].field).toBe('measuredAt');
    // A year typed with two digits ("26" for 2026) is a valid ISO date in year 26: it was stored, and then no list of
    // the finding's readings could be shown (500). Refused, naming the field, and nothing stored.
    const before = await tech.get(`/api/measurements?findingId=${fa.id}&all=true`).expect(200);
    for (const measuredAt of ['0026-03-02T10:15:00Z', '0000-01-01T00:00:00Z', '1899-12-31T23:59:59Z']) {
      const ancient = await tech.post('/api/measurements', { ...murray(fa.id, 0.3), measuredAt }).expect(400);
      expect(ancient.body.error.fields, measuredAt).toEqual([{ field: 'measuredAt', message: 'must be in 1900 or later (check the year)' }]);
    }
    expect((await tech.get(`/api/measurements?findingId=${fa.id}&all=true`).expect(200)).body).toHaveLength(before.body.length);
    const strange = await tech
      .post('/api/measurements', { ...murray(fa.id, 0.3), readings: { ...murray(fa.id, 0.3).readings, colour: 'red' } })
      .expect(400);
    expect(strange.body.error.fields[0].field).toMatch(/^readings/);
    const wrongRun = await tech.post('/api/measurements', { ...murray(fa.id, 0.3), cableRunId: fx.run.id + 1000 }).expect(422);
    expect(wrongRun.body.error.fields[0].field).toBe('cableRunId');
    const list = await tech.get(`/api/measurements?findingId=${fa.id}&all=true`).expect(200);
    expect(list.body).toHaveLength(2); // only the two versions from before
  });

  it('keeps a planner to reading', async () => {
    await (await api.as('planner')).post('/api/measurements', murray(fa.id, 0.3)).expect(403);
  });
});

describe('a run read more often than the list shows', () => {
  it('lists its newest readings, oldest first, so the latest one is never the one left out', async () => {
    const f = await confirmedFinding('A', 60);
    const tech = await api.as('technician');
    const latest = await tech.post('/api/measurements', { ...murray(f.id, 0.15), measuredAt: '2026-03-09T08:00:00Z' }).expect(201);
    const row = (await Measurement.findByPk(latest.body.id as number))!.get({ plain: true }) as Record<string, unknown>;
    delete row.id;
    // As many older readings of the same finding as the list holds, a day apart going back from the latest.
    await Measurement.bulkCreate(
      Array.from({ length: MEASUREMENTS_LISTED }, (_, i) => ({
        ...row,
        measuredAt: new Date(Date.parse('2026-03-08T08:00:00Z') - i * 24 * 60 * 60 * 1000),
      })) as never[],
    );
    const list = await tech.get(`/api/measurements?findingId=${f.id}`).expect(200);
    expect(list.body).toHaveLength(MEASUREMENTS_LISTED);
    expect(list.body[list.body.length - 1].id).toBe(latest.body.id);
    expect(list.body[list.body.length - 1].measuredAt).toBe('2026-03-09T08:00:00.000Z');
    // The oldest reading is the one left out; the rest are in time order.
    const oldestShown = Date.parse('2026-03-08T08:00:00Z') - (MEASUREMENTS_LISTED - 2) * 24 * 60 * 60 * 1000;
    expect(Date.parse(list.body[0].measuredAt as string)).toBe(oldestShown);
    const times = (list.body as { measuredAt: string }[]).map((m) => Date.parse(m.measuredAt));
    expect(times.every((t, i) => i === 0 || t >= times[i - 1])).toBe(true);
  });
});
