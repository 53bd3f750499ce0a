import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { gaussianShapes, parsedTrace } from '../../support/parsed-trace';

/**
 * A step record in volts with no pre-trigger (1 ns samples, the axis starting at the launch) on a
 * lossless line: it opens at the 2 V incident level, and both edges are the instrument's own 12-sample
 * Gaussian rise. A rise of +0.3 V at sample 200 and a fall of 1.1 V (ρ = −0.55 against 2 V) at
 * sample 1100. With no launch edge in the record the instrument's rise is not known beforehand; the
 * near edge shows it, and it must not be read as cable loss on the far one. The check values are the
 * generator's inputs.
 */
const N = 2000;
const VF = 0.66;
/** d = VF·c·t/2, c = 0.299792458 m/ns (SI definition), for a round trip of `samples` 1 ns samples. */
const metres = (samples: number) => (VF * 0.299792458 * samples) / 2;

describe('the loss estimate of a step record that starts after its launch', () => {
  it('reads the instrument rise shared by a near and a far edge as no cable loss', () => {
    const { edge } = gaussianShapes(12);
    const rnd = gaussianSource(31);
    const y = new Float64Array(N).map((_, i) => 2 + 0.3 * edge(i - 200) - 1.1 * edge(i - 1100) + 0.005 * rnd());
    const a = analyzeTrace(parsedTrace(y, { dtS: 1e-9 }), { vf: VF });
    expect(a.mode).toBe('step');
    // No loss, or one too small to matter (under 0.5 dB/100 m at 10 MHz).
    const at10 = a.lossDbPer100m?.find((p) => p.frequencyHz === 1e7)?.dbPer100m ?? 0;
    expect(at10).toBeLessThan(0.5);
    const far = a.events.filter((e) => Math.abs(e.distanceM - metres(1100)) < 2);
    expect(far).toHaveLength(1);
    // 0.66 × 0.2998 m/ns × 1100 ns / 2 = 108.8 m, ρ = −1.1 V / 2 V = −0.55.
    expect(Math.abs(far[0].distanceM - metres(1100))).toBeLessThan(0.15);
    expect(Math.abs(far[0].reflectionCoefficient + 0.55)).toBeLessThan(0.05);
  });
});
