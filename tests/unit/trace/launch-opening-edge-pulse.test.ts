import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { findLaunch } from '../../../shared/trace/launch';
import { estimateSlowNoise } from '../../../shared/trace/noise';
import type { TraceRecord } from '../../../shared/trace/steps';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { gaussianShapes, parsedTrace } from '../../support/parsed-trace';

/**
 * A pulse record with no pre-trigger that opens on its launch's rising edge: a 5 V pulse of 600
 * samples of 1 ns whose edge takes 100 samples (10–90 %) and whose rising 50 % point, the axis zero,
 * lies 45 samples into the record, so the first samples already climb from an eighth of the pulse.
 * The line idles at 0 V between pulses; a change of cable type returns −0.1 of the pulse 1500
 * samples of round trip later. The check values are the generator's inputs.
 */
const N = 3000;
const DT = 1e-9;
const AT = 45;
const WIDTH = 600;
const ECHO = 1500;
const { pulse } = gaussianShapes(100);
const rnd = gaussianSource(7);
const y = new Float64Array(N).map((_, i) => 5 * (pulse(i, AT, WIDTH) - 0.1 * pulse(i, AT + ECHO, WIDTH)) + 0.01 * rnd());
const t = new Float64Array(N).map((_, i) => (i - AT) * DT);

describe('a pulse record that opens on its launch edge', () => {
  it('is told a pulse record by the level it rests at, not read from its first samples', () => {
    const rec: TraceRecord = { y, t, n: N, dt: DT, unit: 'V' };
    const L = findLaunch(rec, 'auto', null, estimateSlowNoise(y));
    expect(L.found).toBe(true);
    expect(L.mode).toBe('pulse');
  });

  it('reports the change of cable type and no short where the launch falls', () => {
    const a = analyzeTrace(parsedTrace(y, { timeS: t }), { vf: 0.66 });
    expect(a.mode).toBe('pulse');
    expect(a.events.some((e) => e.type === 'short')).toBe(false);
    // Round trip 1500 ns at VF 0.66: d = VF·c·t/2 = 0.66 × 0.2998 m/ns × 1500 ns / 2 = 148.4 m.
    const found = a.events.filter((e) => Math.abs(e.distanceM - 148.4) < 3);
    expect(found).toHaveLength(1);
    expect(found[0].reflectionCoefficient).toBeLessThan(0);
  });
});
