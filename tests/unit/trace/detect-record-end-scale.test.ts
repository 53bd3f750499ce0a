import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { detectEdges, FALSE_EVENTS_PER_TRACE } from '../../../shared/trace/detection';
import { findLaunch } from '../../../shared/trace/launch';
import { estimateNoise, estimateSlowNoise } from '../../../shared/trace/noise';
import { buildWorkingSignal } from '../../../shared/trace/signal';
import type { TraceRecord } from '../../../shared/trace/steps';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { gaussianShapes, parsedTrace } from '../../support/parsed-trace';

describe('a far echo that the record cuts short, spread over more than the finest windows', () => {
  // A short cable read with a wide pulse: the launch (400 samples wide, rising in 30) at sample
  // 100, an open's echo of 0.8 of it at 1300 samples of round trip, and the record ending 2100
  // samples in. The echo's ramp in the running sum (400 samples) spans 2.5 of the finest
  // windows (0.4 of the width, 160), where the four-window filter reads little of it; the next
  // scale (480) fits only three windows between the search's start and the record's end.
  const N = 2100;
  const W = 400;
  const RT = 1300;
  const { pulse } = gaussianShapes(30);
  const rnd = gaussianSource(5);
  const y = new Float64Array(N).map((_, i) => pulse(i, 100, W) + 0.8 * pulse(i, 100 + RT, W) + 0.002 * rnd());

  it('is found at a scale coarser than the finest', () => {
    const rec: TraceRecord = { y, t: new Float64Array(N).map((_, i) => i * 1e-10), n: N, dt: 1e-10, unit: 'V' };
    const L = findLaunch(rec, 'auto', null, estimateSlowNoise(y));
    const sig = buildWorkingSignal(rec, L, estimateNoise(y));
    const det = detectEdges(sig, { falseEventsPerTrace: FALSE_EVENTS_PER_TRACE, rhoMin: 0.005 });
    const far = det.candidates.filter((c) => c.sign > 0 && c.i > 1300);
    expect(far).toHaveLength(1);
    // Found at a scale coarser than the finest (twice it, the echo ramp's scale, where four
    // windows fit, or the record-end filter's three times it).
    expect(far[0].w).toBeGreaterThan(sig.w0);
    // And by the record-end filter: the four windows of that scale would run past the record's end.
    expect(far[0].i + 2 * far[0].w).toBeGreaterThan(N);
  });

  it('reads the open at its distance', () => {
    const a = analyzeTrace(parsedTrace(y, { dtS: 1e-10 }), { vf: 0.66 });
    // d = VF·c·t/2 = 0.66 × 0.2998 m/ns × 130 ns / 2 = 12.86 m.
    expect(a.events).toHaveLength(1);
    expect(Math.abs(a.events[0].distanceM - 12.86)).toBeLessThan(0.15);
    expect(a.events[0].type).toBe('open');
  });
});
