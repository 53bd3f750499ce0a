import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { findLaunch } from '../../../shared/trace/launch';
import { estimateSlowNoise } from '../../../shared/trace/noise';
import type { TraceRecord } from '../../../shared/trace/steps';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { gaussianShapes, parsedTrace } from '../../support/parsed-trace';

/**
 * Short, noisy step records in volts (0.1 ns samples, 640 of them, the axis starting at the first
 * sample): a 2 V launch at sample 40 and an open whose reflection doubles it 220 samples later.
 * The check values are the generator's inputs.
 */
const N = 640;
const DT = 1e-10;
const VF = 0.8;
const rec = (y: Float64Array): TraceRecord => ({ y, t: new Float64Array(N).map((_, i) => i * DT), n: N, dt: DT, unit: 'V' });

/** d = VF·c·t/2, c = 0.299792458 m/ns (SI definition), for a round trip of `samples` 0.1 ns samples. */
const metres = (samples: number) => (VF * 0.299792458 * samples * 0.1) / 2;

describe('a noisy launch smaller than the search bar, with a near open after it', () => {
  it('is the launch, and the open after its plateau an event', () => {
    // A 3-sample launch edge to 2 V, the open's +2 V at sample 260 and the source's re-reflection of it
    // (+0.5 V) at 480, in noise of 0.15 V: the slow noise, read over lags the edges fill, passes 0.4 V,
    // so the search's bar (five of it) stands above the launch.
    const { edge } = gaussianShapes(3);
    const rnd = gaussianSource(57);
    const y = new Float64Array(N).map((_, i) => 2 * edge(i - 40) + 2 * edge(i - 260) + 0.5 * edge(i - 480) + 0.15 * rnd());
    expect(5 * estimateSlowNoise(y)).toBeGreaterThan(2);
    const L = findLaunch(rec(y), 'auto', null, estimateSlowNoise(y));
    expect(L.mode).toBe('step');
    expect(Math.abs(L.idx - 40)).toBeLessThanOrEqual(3);
    expect(L.riseSamples).toBeLessThan(10);
    expect(Math.abs(L.height - 2)).toBeLessThan(0.15);
    const a = analyzeTrace(parsedTrace(y, { dtS: DT }), { vf: VF });
    // The open at 0.8 × 0.2998 m/ns × 22 ns / 2 = 2.64 m, ρ = +1.
    const open = a.events.filter((e) => Math.abs(e.distanceM - metres(220)) < 0.1);
    expect(open).toHaveLength(1);
    expect(open[0].type).toBe('open');
    expect(Math.abs((open[0].reflectionCoefficientRaw ?? NaN) - 1)).toBeLessThan(0.1);
  });

});
