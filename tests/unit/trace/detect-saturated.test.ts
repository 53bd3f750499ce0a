import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { heldStretches, touchesHeld } from '../../../shared/trace/noise';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { parsedTrace } from '../../support/parsed-trace';

const DT = 1e-9;
const parsed = (y: Float64Array) => parsedTrace(y, { dtS: DT });

const N = 6000;
const LAUNCH = 400;
const OPEN = 2500;
/** 16-bit recorder whose top is 1.5 V: an open doubles the 1 V launch to 2 V, which it clips. */
const TOP = 1.5;
const Q = 4 / 65536;

/**
 * A 1 V step into a cable open at 2100 samples past the launch, recorded with white noise of 0.01 V
 * and slow (AR(1), φ = 0.98) noise of 0.03 V, the kind that does not average away.
 */
function record(seed: number, clip: boolean): Float64Array {
  const rnd = gaussianSource(seed);
  const phi = 0.98;
  let ar = 0;
  return new Float64Array(N).map((_, i) => {
    ar = phi * ar + 0.03 * Math.sqrt(1 - phi * phi) * rnd();
    const clean = (i < LAUNCH ? 0 : 1) + (i < OPEN ? 0 : 1);
    const v = clean + ar + 0.01 * rnd();
    return Math.round((clip ? Math.min(v, TOP) : v) / Q) * Q;
  });
}

describe('a step record clipped after the cable end', () => {
  it('finds the held stretch only where noise shows elsewhere', () => {
    const held = heldStretches(record(31, true));
    expect(held).not.toBeNull();
    // The open doubles the level to 2 V, 0.5 V over the top (17 noise σ): held from its edge to the end.
    expect(held![held!.length - 1]).toBe(N);
    expect(Math.abs(held![held!.length - 2] - OPEN)).toBeLessThan(5);
    expect(touchesHeld(held, OPEN - 100, OPEN - 20)).toBe(false);
    expect(touchesHeld(held, OPEN - 100, OPEN + 20)).toBe(true);
    expect(touchesHeld(held, N - 30, N)).toBe(true);
    // A quiet recorder: levels held at the record's extremes are just the signal.
    const quiet = new Float64Array(N).map((_, i) => (i < LAUNCH ? 0 : 1));
    expect(heldStretches(quiet)).toBeNull();
  });

  it('measures the slow noise on the part that is not held flat, so it reports the end alone', () => {
    for (const seed of [32, 33, 34]) {
      const a = analyzeTrace(parsed(record(seed, true)), { vf: 0.66 });
      // d = 0.66 × 0.29979 m/ns × 2100 ns / 2 = 207.8 m (from the launch's 50 % point).
      // The clipped open reads as a rise of about 0.5 (the headroom that was left).
      expect(a.events).toHaveLength(1);
      expect(a.events[0].reflectionCoefficientRaw).toBeGreaterThan(0.4);
      expect(Math.abs(a.events[0].distanceM - 207.8)).toBeLessThan(2);
    }
  });

  it('reports the same single open on the same record unclipped', () => {
    const a = analyzeTrace(parsed(record(32, false)), { vf: 0.66 });
    expect(a.events.map((e) => e.type)).toEqual(['open']);
    expect(Math.abs(a.events[0].distanceM - 207.8)).toBeLessThan(2);
  });
});
