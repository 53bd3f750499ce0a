import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { findLaunch } from '../../../shared/trace/launch';
import { estimateSlowNoise } from '../../../shared/trace/noise';
import type { TraceRecord } from '../../../shared/trace/steps';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { parsedTrace } from '../../support/parsed-trace';

const DT = 1e-10;
const N = 3000;
const record = (y: Float64Array): TraceRecord => ({ y, t: new Float64Array(y.length).map((_, i) => i * DT), n: y.length, dt: DT, unit: 'V' });
/** A linear edge from 0 to 1 over `rise` samples starting at `at` (may be before the record). */
const ramp = (i: number, at: number, rise: number) => Math.min(1, Math.max(0, (i - at) / rise));

describe('a step record without pre-trigger that opens on the launch edge', () => {
  // Incident level 2 V; the record's first sample is the edge's middle (the axis zero there),
  // and the edge takes 12 samples; a fault of ρ = −0.25 at 1000 samples of round trip.
  const INCIDENT = 2;
  const RISE = 12;
  const FAULT = 1000;
  const RHO = -0.25;
  const rnd = gaussianSource(21);
  const y = new Float64Array(N).map(
    (_, i) => INCIDENT * ramp(i, -RISE / 2, RISE) * (1 + RHO * ramp(i, FAULT - RISE / 2, RISE)) + 0.004 * rnd(),
  );

  it('takes the incident level where the opening climb settles, not at the first samples', () => {
    const L = findLaunch(record(y), 'auto', null, estimateSlowNoise(y));
    expect(L.found).toBe(false);
    expect(L.mode).toBe('step');
    // The first samples sit at half the incident level; the plateau is the incident level.
    expect(L.height).toBeGreaterThan(0.97 * INCIDENT);
    expect(L.height).toBeLessThan(1.03 * INCIDENT);
  });

  it("reads the fault's step against that level", () => {
    const a = analyzeTrace(parsedTrace(y, { timeS: record(y).t }), { vf: 0.66 });
    // d = VF·c·t/2 = 0.66 × 0.2998 m/ns × 100 ns / 2 = 9.89 m.
    const near = a.events.filter((e) => Math.abs(e.distanceM - 9.89) < 0.3);
    expect(near).toHaveLength(1);
    // The height read at the instrument, before any correction (the first samples, at half the
    // incident level, would read it twice as large).
    expect(near[0].reflectionCoefficientRaw).toBeGreaterThan(RHO - 0.03);
    expect(near[0].reflectionCoefficientRaw).toBeLessThan(RHO + 0.03);
    // Nothing is read from the opening climb itself.
    expect(a.events.filter((e) => e.distanceM < 1)).toHaveLength(0);
  });

  it('keeps the first samples as the level when the record opens already on it', () => {
    const flat = new Float64Array(N).map((_, i) => INCIDENT * (1 + RHO * ramp(i, FAULT - RISE / 2, RISE)) + 0.004 * rnd());
    const L = findLaunch(record(flat), 'auto', null, estimateSlowNoise(flat));
    expect(L.height).toBeGreaterThan(0.98 * INCIDENT);
    expect(L.height).toBeLessThan(1.02 * INCIDENT);
  });
});
