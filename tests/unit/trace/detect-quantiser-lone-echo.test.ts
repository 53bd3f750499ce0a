import { describe, expect, it } from 'vitest';
import { analyzeCsv } from '../../../shared/trace';
import { drawCase } from '../../../scripts/sim2/cases';

/**
 * A quiet pulse record whose recorder's levels show: a run of the neighbouring level is no evidence of an
 * echo where the resting level lies near that rounding point (its samples touch the level at rest), but
 * one of a level the record never touched at rest, held unbroken for about the launch's width and back
 * after, is. The check values are the simulator's (scripts/sim2, finite differences of the telegrapher's
 * equations with the line's loss), drawn from a fixed seed; the distance tolerance is the product's,
 * max(0.5 m, 1 %).
 */

const tolM = (d: number) => Math.max(0.5, 0.01 * d);

const listed = (events: Array<{ distanceM: number; type: string; reflectionCoefficient: number }>) =>
  JSON.stringify(events.map((e) => [e.distanceM.toFixed(2), e.type, e.reflectionCoefficient.toFixed(3)]));

describe('an echo of one recorder level on a quiet pulse record', () => {
  const c = drawCase(0xbd9ac51c, 65, 'unit');

  it('is the record the check values describe', () => {
    expect(c.mode).toBe('pulse');
    const required = c.expected.filter((e) => e.required);
    expect(required.map((e) => [e.distanceM.toFixed(2), e.what])).toEqual([
      ['18.57', 'bridged tap junction'],
      ['29.42', 'bridged tap end (10.9 m stub)'],
      ['42.32', 'shunt 339 Ω'],
    ]);
  });

  it('reports the shunt at 42.3 m with the cable loss known', () => {
    const a = analyzeCsv(c.csv, c.parseOptions ?? {}, { vf: c.vf, z0Ohm: c.z0Ohm, loss: c.loss });
    // The shunt's echo holds the level below the resting one for 50 samples (the launch is 52 wide),
    // a level the record did not touch in the 172 samples before it; it was not reported.
    const shunt = a.events.filter((e) => Math.abs(e.distanceM - 42.32) <= tolM(42.32));
    expect(shunt.length, listed(a.events)).toBe(1);
    expect(shunt[0].type).toBe('impedance-drop');
    expect(shunt[0].likelyMultipleOf).toBeNull();
    // The stub's second round trip at 40.3 m stays flagged as its echo, and nothing follows the shunt.
    const echo = a.events.find((e) => Math.abs(e.distanceM - 40.28) <= tolM(40.28));
    expect(echo?.likelyMultipleOf, listed(a.events)).not.toBeNull();
    expect(a.events.length, listed(a.events)).toBe(4);
  });
});
