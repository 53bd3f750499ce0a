import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { modalLevel } from '../../../shared/trace/signal';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { gaussianShapes, parsedTrace } from '../../support/parsed-trace';

describe('the level most of a record rests on', () => {
  it('stays on the line where echoes of several levels together fill most of the record', () => {
    // 300 samples on the line (0), 250 on a short's echo (−0.88), 240 on −0.05 and 210 on −0.10:
    // the median (rank 500 of 1000) sits on the −0.05 echo; the modal interval 2 × 0.015 wide on 0.
    const v = [...Array(300).fill(0), ...Array(250).fill(-0.88), ...Array(240).fill(-0.05), ...Array(210).fill(-0.1)];
    const values = Float64Array.from(v);
    expect([...values].sort((a, b) => a - b)[500]).toBe(-0.05);
    expect(modalLevel(values, 0, values.length, 0.015)).toBe(0);
  });

  it('is the median of the values in the fullest interval', () => {
    // 0.10, 0.11, 0.12 (three within 2 × 0.01) against 0.5 and 0.9: the middle one of the three.
    expect(modalLevel(Float64Array.from([0.5, 0.1, 0.9, 0.12, 0.11]), 0, 5, 0.01)).toBe(0.11);
  });
});

describe('a short cable read with a wide pulse from the launch on, its echoes filling most of the record', () => {
  // 2191 samples of 0.1593 ns; the record opens during a launch pulse 241 samples wide (rising in 31,
  // its 50 % point 10 samples before the record, the axis zero); a shunt of ρ = −0.05 at a round trip of
  // 360 samples, the short end's −0.88 at 850 and its bounces (−0.045 at 1360, −0.07 at 1720); a recorder
  // of 0.01 steps, white noise of 0.003. The halves' medians both sit on echoes, 0.01–0.05 off the line.
  const trace = (seed: number, shunt: number) => {
    const { pulse } = gaussianShapes(31);
    const rnd = gaussianSource(seed);
    const y = new Float64Array(2191).map((_, i) => {
      const v =
        pulse(i, -10, 241) +
        shunt * pulse(i, 350, 241) -
        0.88 * pulse(i, 840, 241) -
        0.045 * pulse(i, 1350, 241) -
        0.07 * pulse(i, 1710, 241) +
        0.003 * rnd();
      return Math.round(v / 0.01) * 0.01;
    });
    return analyzeTrace(parsedTrace(y, { dtS: 1.593e-10, t0S: 10 * 1.593e-10 }), { vf: 0.508 });
  };

  it('finds the shunt just past the launch, with its ρ', () => {
    // d = VF·c·t/2 = 0.508 × 0.29979 m/ns × (360 × 0.1593 ns) / 2 = 4.37 m.
    for (let seed = 1; seed <= 3; seed++) {
      const a = trace(seed, -0.05);
      expect(a.mode).toBe('pulse');
      const near = a.events.filter((e) => Math.abs(e.distanceM - 4.37) < 0.5);
      expect(near).toHaveLength(1);
      expect(near[0].reflectionCoefficient).toBeGreaterThan(-0.065);
      expect(near[0].reflectionCoefficient).toBeLessThan(-0.035);
    }
  });

  it('reports nothing there without the shunt', () => {
    for (let seed = 1; seed <= 3; seed++) expect(trace(seed, 0).events.filter((e) => e.distanceM < 8)).toHaveLength(0);
  });
});
