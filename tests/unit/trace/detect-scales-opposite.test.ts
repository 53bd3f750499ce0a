import { describe, expect, it } from 'vitest';
import { analyzeTrace, type ParsedTrace } from '../../../shared/trace';

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
  const dt = 0.76e-9;
  const erf = (x: number) => {
    // Abramowitz & Stegun 7.1.26
    const s = Math.sign(x);
    const a = Math.abs(x);
    const t = 1 / (1 + 0.3275911 * a);
    return s * (1 - ((((1.061405429 * t - 1.453152027) * t + 1.421413741) * t - 0.284496736) * t + 0.254829592) * t * Math.exp(-a * a));
  };
  const edge = (i: number, at: number) => 0.5 * (1 + erf((i - at) / 12));
  const pulse = (i: number, at: number) => edge(i, at) - edge(i, at + 217);
  let seed = 5;
  const rnd = () => {
    // Park–Miller minimal standard generator, then Box–Muller for a normal deviate.
    seed = (seed * 16807) % 2147483647;
    const u1 = seed / 2147483647;
    seed = (seed * 16807) % 2147483647;
    const u2 = seed / 2147483647;
    return Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
  };
  const timeS = new Float64Array(n);
  const amplitude = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    timeS[i] = (i - 330) * dt;
    amplitude[i] = pulse(i, 330) + small * pulse(i, 1100) - 0.5 * pulse(i, 1540) + 0.002 * rnd();
  }
  return {
    timeS,
    amplitude,
    amplitudeUnit: 'V',
    metadata: {},
    hints: {},
    layout: { kind: 'time-amplitude', delimiter: ',', decimal: '.', timeUnit: 's', amplitudeUnit: 'V' },
    warnings: [],
  } as unknown as ParsedTrace;
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
