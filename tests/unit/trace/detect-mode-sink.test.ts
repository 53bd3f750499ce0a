import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { gaussianShapes, parsedTrace } from '../../support/parsed-trace';

/**
 * A pulse record whose launch is wide beside the record (500 samples of 10 ps after a pre-trigger of
 * 150, in a record of 1200): its fall, read as a step record, is a short. A change of cable type
 * returns −0.11 of the pulse 700 samples of round trip after the launch, an echo as wide as the
 * launch that lasts past the record's end, in noise of 0.05 of the launch. The check values are the
 * generator's inputs.
 */
const N = 1200;
const DT = 1e-11;
const AT = 150;
const WIDTH = 500;
const ECHO = 700;

function record(echoRho: number, noise: number) {
  const { pulse } = gaussianShapes(6);
  const rnd = gaussianSource(5);
  const y = new Float64Array(N).map(
    (_, i) => 2.5 * (pulse(i, AT, WIDTH) + echoRho * pulse(i, AT + ECHO, WIDTH)) + 2.5 * noise * rnd(),
  );
  return parsedTrace(y, { dtS: DT, t0S: -AT * DT });
}

describe('a wide pulse record read as a step into a short', () => {
  it('is read as a pulse record when the level past the short sinks below the pre-launch level', () => {
    const a = analyzeTrace(record(-0.11, 0.05), { vf: 0.66 });
    expect(a.mode).toBe('pulse');
    expect(a.warnings.map((w) => w.code)).toContain('MODE_FROM_ECHOES');
    expect(a.events.some((e) => e.type === 'short')).toBe(false);
  });

  it('keeps a step reading whose level past the short stays on the pre-launch level', () => {
    // The same record with no echo: nothing past the fall, so whatever mode the launch gives stands.
    const a = analyzeTrace(record(0, 0.05), { vf: 0.66 });
    expect(a.warnings.map((w) => w.code)).not.toContain('MODE_FROM_ECHOES');
  });

  it('keeps a step into a short whose level undershoots on a mismatched source and returns', () => {
    // A step record of 2 V into a short 450 samples of 1 ns of round trip away, from a source whose
    // reflection coefficient is +0.13: the short's reflection comes back to the source, which sends
    // 0.13 of it back, so the level steps 1 → −0.13 → +0.017 of the step at each round trip (a lattice
    // diagram, common practice), back towards the pre-launch level, never further from it.
    const G = 0.13;
    const T = 450;
    const { edge } = gaussianShapes(6);
    const rnd = gaussianSource(9);
    const y = new Float64Array(N).map(
      (_, i) =>
        2 *
          (edge(i - AT) -
            (1 + G) * edge(i - AT - T) +
            G * (1 + G) * edge(i - AT - 2 * T) -
            G * G * (1 + G) * edge(i - AT - 3 * T)) +
        0.004 * rnd(),
    );
    const a = analyzeTrace(parsedTrace(y, { dtS: 1e-9, t0S: -AT * 1e-9 }), { vf: 0.66 });
    expect(a.mode).toBe('step');
    // It sits 0.13 of the step below its pre-launch level past the short, but no further than just past it.
    // d = VF·c·t/2 = 0.66 × 0.2998 m/ns × 450 ns / 2 = 44.5 m.
    const short = a.events.filter((e) => e.type === 'short' && e.likelyMultipleOf === null);
    expect(short).toHaveLength(1);
    expect(Math.abs(short[0].distanceM - 44.5)).toBeLessThan(0.5);
  });
});
