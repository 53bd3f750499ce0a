import { describe, expect, it } from 'vitest';
import { analyzeTrace, type ParsedTrace } from '../../../shared/trace';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { gaussianShapes, parsedTrace } from '../../support/parsed-trace';

/**
 * A pulse record with a wide launch (217 samples of 0.76 ns): a small rise echo (ρ +0.1 or +0.05) at
 * 770 samples past the launch and a strong drop (−0.5) 440 samples after it. At the finest filter
 * scale the small echo's corners read as small edges of both signs; the strong drop reads at the next
 * scale, 20 times larger and of the opposite sign, and must not be taken for the small echo seen wider.
 * The check values are the generator's inputs: the drop's round trip of 1,210 samples at VF 0.81 is
 * d = VF·c·t/2 = 111.6 m, the rise's 770 samples 71.0 m.
 */
function record(small: number): ParsedTrace {
  const n = 1900;
  const { pulse } = gaussianShapes(22);
  const rnd = gaussianSource(5);
  const y = new Float64Array(n).map((_, i) => pulse(i, 330, 217) + small * pulse(i, 1100, 217) - 0.5 * pulse(i, 1540, 217) + 0.002 * rnd());
  return parsedTrace(y, { dtS: 0.76e-9, t0S: -330 * 0.76e-9 });
}

describe('a strong echo just after a small one of the other sign', () => {
  for (const small of [0.1, 0.05]) {
    it(`finds both when the small one is ρ ${small}`, () => {
      const a = analyzeTrace(record(small), { vf: 0.81, mode: 'pulse' });
      const rise = a.events.find((e) => Math.abs(e.distanceM - 71.0) < 1.5);
      const drop = a.events.find((e) => Math.abs(e.distanceM - 111.6) < 1.5);
      expect(rise?.reflectionCoefficient).toBeGreaterThan(0);
      expect(drop?.reflectionCoefficient).toBeLessThan(-0.3);
    });
  }
});
