import { describe, expect, it } from 'vitest';
import { analyzeCsv } from '../../../shared/trace';
import { drawCase } from '../../../scripts/sim2/cases';

/**
 * A quiet step record whose recorder's levels show: an edge whose reading holds one level is no evidence
 * of a reflection (a slow creep crosses each level so), but one the record climbs several levels in, in a
 * short run from a level it rested at, is. The check values are the simulator's (scripts/sim2, finite
 * differences of the telegrapher's equations with the line's loss), drawn from a fixed seed; the distance
 * tolerance is the product's, max(0.5 m, 1 %).
 */

const tolM = (d: number) => Math.max(0.5, 0.01 * d);

const listed = (events: Array<{ distanceM: number; type: string; reflectionCoefficient: number }>) =>
  JSON.stringify(events.map((e) => [e.distanceM.toFixed(2), e.type, e.reflectionCoefficient.toFixed(3)]));

describe('a loss-spread edge of a few recorder levels on a quiet record', () => {
  const c = drawCase(0xddeeff31, 42, 'unit');

  it('is the record the check values describe', () => {
    expect(c.mode).toBe('step');
    const required = c.expected.filter((e) => e.required);
    expect(required.map((e) => [e.distanceM.toFixed(2), e.type])).toEqual([
      ['30.22', 'impedance-rise'],
      ['101.23', 'impedance-drop'],
      ['152.96', 'impedance-drop'],
    ]);
  });

  for (const withLoss of [true, false]) {
    it(`reports the splice's drop at 101.2 m and the shunt at 153.0 m${withLoss ? ', cable loss known' : ''}`, () => {
      const a = analyzeCsv(c.csv, c.parseOptions ?? {}, { vf: c.vf, z0Ohm: c.z0Ohm, loss: withLoss ? c.loss : undefined });
      // Each was read as one level of the recorder (ρ about −0.02, the level 0.018) and not reported,
      // though the record falls five levels at the splice and two at the shunt, each from a level it rested at.
      for (const d of [101.23, 152.96]) {
        const near = a.events.filter((e) => Math.abs(e.distanceM - d) <= tolM(d) && e.type === 'impedance-drop');
        expect(near.length, listed(a.events)).toBe(1);
        expect(near[0].reflectionCoefficient).toBeLessThan(0);
      }
      // Nothing else but the series fault at 30.2 m and the splice's far edge at 102.0 m.
      expect(a.events.length, listed(a.events)).toBe(4);
    });
  }
});
