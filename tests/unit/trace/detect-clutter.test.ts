import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { parsedTrace } from '../../support/parsed-trace';

const DT = 1e-9;
const N = 20000;
const parsed = (y: Float64Array) => parsedTrace(y, { dtS: DT });

/** A 1 V step launched at sample 500 into a line with a 0.5 V rise at sample 12000, white noise of 0.01 V. */
function record(seed: number): Float64Array {
  const rnd = gaussianSource(seed);
  return new Float64Array(N).map((_, i) => (i >= 500 ? 1 : 0) + (i >= 12000 ? 0.5 : 0) + 0.01 * rnd());
}
/** A small deterministic generator for where the clutter falls. */
function lcg(seed: number): () => number {
  let s = seed;
  return () => (s = (s * 1103515245 + 12345) % 2147483648) / 2147483648;
}
// d = 0.66 × 0.29979 m/ns × 11500 ns / 2 = 1137.7 m
const RISE_M = 1137.7;

const CLUTTER: Record<string, (y: Float64Array) => void> = {
  // Interference spikes of 10–30 noise deviations, one sample each.
  spikes: (y) => {
    const u = lcg(12345);
    for (let k = 0; k < 60; k++) y[600 + Math.floor(u() * 19000)] += (u() < 0.5 ? -1 : 1) * (0.1 + 0.2 * u());
  },
  // Short decaying bursts of interference.
  bursts: (y) => {
    const u = lcg(777);
    for (let k = 0; k < 30; k++) {
      const i = 600 + Math.floor(u() * 19000);
      for (let j = 0; j < 40 && i + j < N; j++) y[i + j] += 0.08 * Math.sin(j / 2) * Math.exp(-j / 15);
    }
  },
  // The launch ringing for thousands of samples.
  ringing: (y) => {
    for (let i = 500; i < N; i++) y[i] += 0.05 * Math.sin((i - 500) / 9) * Math.exp(-(i - 500) / 4000);
  },
};

describe('a record full of clutter its noise measure does not see', () => {
  for (const [name, add] of Object.entries(CLUTTER)) {
    it(`reports only what stands out of it (${name})`, () => {
      const y = record(3);
      add(y);
      const a = analyzeTrace(parsed(y), { vf: 0.66 });
      expect(a.events).toHaveLength(1);
      expect(Math.abs(a.events[0].distanceM - RISE_M)).toBeLessThan(RISE_M * 0.01);
      expect(a.events[0].reflectionCoefficientRaw).toBeGreaterThan(0.4);
      expect(a.warnings.map((w) => w.code)).toContain('CLUTTER');
    });
  }

  it('leaves a clean record as it is', () => {
    const a = analyzeTrace(parsed(record(3)), { vf: 0.66 });
    expect(a.events).toHaveLength(1);
    expect(Math.abs(a.events[0].distanceM - RISE_M)).toBeLessThan(RISE_M * 0.01);
    expect(a.warnings.map((w) => w.code)).not.toContain('CLUTTER');
  });
});
