import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { gaussianShapes, parsedTrace } from '../../support/parsed-trace';

/** An 8-bit recorder over ±4 V: a step of 8/256 = 0.03125 V, rounding to the nearest level. */
const Q = 8 / 256;
const quantise = (v: number) => Math.round(v / Q) * Q;
const N = 3000;
/** A 2 V launch pulse 8 samples wide at half height, rising in 3, at sample 50 (1.6 % of it is one level). */
const { pulse } = gaussianShapes(3);
const launch = (i: number) => 2 * pulse(i, 50, 8);

/**
 * A pulse record read by a quiet, coarse recorder: white noise of 0.05 of a level and slow noise of
 * 0.3 of a level (correlated over 15 samples), resting 0.3 of a level off one, so the record flickers
 * to the level below in runs of a few to tens of samples; then the recorder's rounding.
 */
function recorded(echo: (i: number) => number, seed: number): Float64Array {
  const rnd = gaussianSource(seed);
  const a = Math.exp(-1 / 15);
  let slow = 0;
  return new Float64Array(N).map((_, i) => {
    slow = a * slow + Math.sqrt(1 - a * a) * rnd();
    return quantise(launch(i) + echo(i) - 0.2 * Q + 0.3 * Q * slow + 0.05 * Q * rnd());
  });
}

describe('a pulse record from a quiet, coarse recorder', () => {
  it('reports no echo where the record only flickers to the neighbouring level', () => {
    // Each run of the level below sums, in the running integral, to a step of a few hundredths of
    // the launch's area, above the threshold set for white rounding noise of q/√12; none is an echo.
    let events = 0;
    for (let s = 0; s < 10; s++) {
      const a = analyzeTrace(parsedTrace(recorded(() => 0, 700 + s)), { vf: 0.66 });
      expect(a.mode).toBe('pulse');
      events += a.events.length;
    }
    expect(events).toBe(0);
  });

  it('still reports an echo four levels high on the same recorder', () => {
    // An echo of 4 levels (0.125 V, ρ = 0.0625) 8 samples wide at 1550, 1500 ns after the launch:
    // d = 0.66 × 0.2998 m/ns × 1500 ns / 2 = 148.4 m.
    const y = recorded((i) => 4 * Q * pulse(i, 1550, 8), 731);
    const a = analyzeTrace(parsedTrace(y), { vf: 0.66 });
    expect(a.events).toHaveLength(1);
    expect(Math.abs(a.events[0].distanceM - 148.4)).toBeLessThan(2);
    expect(a.events[0].type).toBe('impedance-rise');
    // Within one and a half levels over the launch's width: 1.5 × 0.03125 V / 2 V = 0.023 in ρ (the rounding
    // and slow noise under an echo this small move its area by about a level's worth).
    expect(Math.abs(a.events[0].reflectionCoefficient - 0.0625)).toBeLessThan(0.023);
  });
});
