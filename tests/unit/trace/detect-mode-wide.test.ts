import { describe, expect, it } from 'vitest';
import { analyzeTrace, type ParsedTrace } from '../../../shared/trace';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { gaussianShapes, parsedTrace } from '../../support/parsed-trace';

/**
 * A pulse record whose launch is wide (150 samples of 4 ns, rise 28) beside a cable that is short
 * for it: the record climbs to the launch, falls back to its baseline, and climbs again for the
 * open end's echo 250 samples later. Read as a step record it would be a short at 56 m with the line
 * seen beyond it, which no cable can show. The check values are the generator's inputs.
 */
function record(echoAt: number | null): ParsedTrace {
  const n = 700;
  const { pulse } = gaussianShapes(22);
  const rnd = gaussianSource(3);
  const y = new Float64Array(n).map((_, i) => pulse(i, 50, 150) + (echoAt === null ? 0 : 0.97 * pulse(i, 50 + echoAt, 150)) + 0.006 * rnd());
  return parsedTrace(y, { dtS: 4e-9, t0S: -50 * 4e-9 });
}

describe('a wide pulse record with no stated width', () => {
  it('is read as a pulse record when a step reading would show the line past a short', () => {
    const a = analyzeTrace(record(250), { vf: 0.58 });
    expect(a.mode).toBe('pulse');
    expect(a.warnings.map((w) => w.code)).toContain('MODE_FROM_ECHOES');
    // Round trip 250 samples of 4 ns at VF 0.58: d = VF·c·t/2 = 86.9 m.
    const open = a.events.filter((e) => e.likelyMultipleOf === null);
    expect(open).toHaveLength(1);
    expect(open[0].type).toBe('open');
    expect(Math.abs(open[0].distanceM - 86.9)).toBeLessThan(1.5);
  });

  it('is read as a pulse record when a short record shows a smaller echo past the fall', () => {
    // A record of 460 samples, too short beside the 150-sample launch for it to be taken as a pulse
    // at once, with the far end's echo of 0.25 of the launch 200 samples after it. Past a short read
    // at ρ ≈ −1 a step record shows at most (1 − |ρ|)² ≈ 0 of what lies beyond (Pozar §2.3), so an
    // echo of that size already rules the step reading out. Round trip 200 samples of 4 ns at
    // VF 0.58: d = VF·c·t/2 = 69.5 m. The check values are the generator's inputs.
    const { pulse } = gaussianShapes(22);
    const rnd = gaussianSource(3);
    const y = new Float64Array(460).map((_, i) => pulse(i, 50, 150) + 0.25 * pulse(i, 250, 150) + 0.006 * rnd());
    const a = analyzeTrace(parsedTrace(y, { dtS: 4e-9, t0S: -50 * 4e-9 }), { vf: 0.58 });
    expect(a.mode).toBe('pulse');
    expect(a.warnings.map((w) => w.code)).toContain('MODE_FROM_ECHOES');
    expect(a.events.some((e) => e.type === 'short')).toBe(false);
    // The echo itself is not located: 260 samples after a 150-sample launch are too few for the step
    // filter's windows at the echo's scale (its ramp in the running sum is 150 samples long). With the
    // baseline read right, nothing else is reported either; the first case locates an echo in a longer record.
    expect(a.events).toHaveLength(0);
    expect(a.warnings.map((w) => w.code)).toContain('NO_REFLECTION');
  });

  it('keeps a step reading that ends at a short with nothing past it', () => {
    // The same launch with no echo: nothing past the fall, so whatever mode the launch gives stands.
    const a = analyzeTrace(record(null), { vf: 0.58 });
    expect(a.warnings.map((w) => w.code)).not.toContain('MODE_FROM_ECHOES');
  });
});
