import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BestLocationView } from '../../shared/schemas/measurements';
import type { CableRunView } from '../../shared/schemas/sites';
import { startApi, type Client, type TestApi } from './support/api';
import { confirmedFinding, supervisedRun } from './tickets.support';

let api: TestApi;
let fx: Awaited<ReturnType<typeof supervisedRun>>;
let sup: Client;

/**
 * The run's markers (200 m run: MH-1 at chainage 40 m with 2 m coiled, MH-2 at 80 m with 3 m, P-7 at 120 m),
 * with invented test coordinates on one meridian: MH-2 at −30°, P-7 0.00036° further south
 * (0.00036 × 111 194.93 m = 40.03 m in a straight line, for 40 m along the route).
 */
const markers = (p7Latitude: number | null = -30.00036, extra: Record<string, unknown> = {}) => ({
  markers: [
    { label: 'MH-1', kind: 'manhole', chainageM: 40, slackM: 2, ...extra },
    { label: 'MH-2', kind: 'manhole', chainageM: 80, slackM: 3, latitude: -30, longitude: -15 },
    { label: 'P-7', kind: 'pedestal', chainageM: 120, slackM: 0, latitude: p7Latitude, longitude: p7Latitude === null ? null : -15 },
  ],
});

beforeAll(async () => {
  api = await startApi();
  fx = await supervisedRun(api, 'Mapped run');
  sup = await api.as('supervisor');
});
afterAll(() => api?.close());

describe('route marker coordinates', () => {
  it('refuses coordinates a route cannot have, naming the marker and field, and keeps the markers as they were', async () => {
    const half = await sup.put(`/api/cable-runs/${fx.run.id}/markers`, markers(-30.00036, { latitude: -29.9996 })).expect(422);
    expect(half.body.error.fields).toEqual([{ field: 'markers.0.longitude', message: 'marker MH-1 has a latitude but no longitude: give both or neither' }]);
    const range = await sup.put(`/api/cable-runs/${fx.run.id}/markers`, markers(-91)).expect(400);
    expect(range.body.error.fields[0]).toEqual({ field: 'markers.2.latitude', message: 'must be between -90 and 90 degrees' });
    const text = await sup.put(`/api/cable-runs/${fx.run.id}/markers`, markers(-30.00036, { latitude: '51.5', longitude: '-1' })).expect(400);
    expect(text.body.error.fields[0].field).toBe('markers.0.latitude');
    const unset = await sup.put(`/api/cable-runs/${fx.run.id}/markers`, markers(-30.00036, { latitude: 0, longitude: 0 })).expect(422);
    expect(unset.body.error.fields[0].message).toMatch(/unset position/);
    // P-7 0.01° south of MH-2 is 1112 m away in a straight line, but only 40 m further along the route.
    const far = await sup.put(`/api/cable-runs/${fx.run.id}/markers`, markers(-30.01)).expect(422);
    expect(far.body.error.code).toBe('invalid_markers');
    expect(far.body.error.fields).toEqual([
      {
        field: 'markers.2.latitude',
        message: 'marker P-7 is 1112 m from MH-2 in a straight line but only 40.0 m further along the route: check its coordinates or its chainage',
      },
    ]);
    const run = (await sup.get(`/api/cable-runs/${fx.run.id}`).expect(200)).body as CableRunView;
    expect(run.markers.every((m) => m.latitude === null && m.longitude === null)).toBe(true);
  });

  it('places the best location on the ground between the markers with coordinates', async () => {
    const saved = (await sup.put(`/api/cable-runs/${fx.run.id}/markers`, markers()).expect(200)).body as CableRunView;
    expect(saved.markers.map((m) => [m.label, m.latitude, m.longitude])).toEqual([
      ['MH-1', null, null],
      ['MH-2', -30, -15],
      ['P-7', -30.00036, -15],
    ]);
    const f = await confirmedFinding(api, fx.run.id, 120, 'A');
    const best = (await sup.get(`/api/findings/${f.id}`).expect(200)).body.bestLocation as BestLocationView;
    const chainage = best.routePosition!.chainageM;
    // 120 m of cable less 5 m of slack is chainage 115 m: 35/40 of the way from MH-2 to P-7,
    // −30 − 0.875 × 0.00036 = −30.000315° (hand-worked); exactly, from the chainage the engine's reading gives.
    expect(chainage).toBeCloseTo(115, 0);
    expect(best.ground!.point.latitude).toBeCloseTo(-30 - ((chainage - 80) / 40) * 0.00036, 9);
    expect(best.ground!.point.latitude).toBeCloseTo(-30.000315, 4);
    expect(best.ground!.point.longitude).toBeCloseTo(-15, 9);
    expect([best.ground!.fromLabel, best.ground!.toLabel]).toEqual(['MH-2', 'P-7']);
    expect(best.groundNote).toBeNull();
    // The window's ends on the ground lie either side of the point along the meridian.
    expect(best.ground!.windowStart.latitude).toBeGreaterThan(best.ground!.point.latitude);
    expect(best.ground!.windowEnd.latitude).toBeLessThan(best.ground!.point.latitude);
  });
});
