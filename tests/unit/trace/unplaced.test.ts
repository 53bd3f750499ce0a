import { describe, expect, it } from 'vitest';
import type { ReflectionEvent } from '../../../shared/schemas/trace-analysis';
import { analyzeCsv } from '../../../shared/trace';
import { dropUnplaced } from '../../../shared/trace/analyze';
import { drawCase } from '../../../scripts/sim2/cases';

/**
 * A weak change of level that the edge fit can place only to within a fifth of its own distance (the
 * window's half-width) is not listed as an event: it is a slow change (a lossy line's creep, a wander of
 * the noise, the foot of a far edge), not an edge off a discontinuity, and no distance can be given for
 * it. The record's warnings say where it lay. The traces are cases of the second simulator (scripts/sim2,
 * finite differences of the telegrapher's equations with the line's loss), drawn from fixed seeds; the
 * check values are where it put the events.
 */

const ev = (distanceM: number, uncertaintyM: number, snr: number, likelyMultipleOf: number | null, index: number) =>
  ({
    index,
    distanceM,
    uncertaintyM,
    snr,
    reflectionCoefficient: 0.05,
    reflectionCoefficientRaw: 0.05,
    type: 'impedance-rise',
    likelyMultipleOf,
    isCableEnd: false,
  }) as ReflectionEvent;

function analyseDrawn(seed: number, index: number, withLoss: boolean) {
  const c = drawCase(seed, index, 'unit');
  const a = analyzeCsv(c.csv, c.parseOptions ?? {}, { vf: c.vf, z0Ohm: c.z0Ohm, loss: withLoss ? c.loss : undefined });
  return { c, a };
}

const listed = (events: ReadonlyArray<{ distanceM: number; type: string }>) =>
  JSON.stringify(events.map((e) => [e.distanceM.toFixed(2), e.type]));

describe('events too weak and too spread to place', () => {
  it('drops a weak event whose window is wider than a fifth of its distance, with its echo, and keeps the rest', () => {
    const events = [
      ev(50, 1.2, 30, null, 0), // narrow and strong
      ev(650, 300, 5.8, null, 1), // ± 46 % at 5.8 σ: dropped
      ev(1300, 20, 5.5, 1, 2), // its echo goes with it, though placed to 2 %
      ev(1280, 400, 19.6, null, 3), // as spread, but standing well out of the noise: kept
      ev(3.5, 0.6, 8.8, null, 4), // weak, but placed to 17 % of its distance: kept
    ];
    const warnings = dropUnplaced(events);
    expect(events.map((e) => [e.distanceM, e.index])).toEqual([
      [50, 0],
      [1280, 1],
      [3.5, 2],
    ]);
    expect(warnings.map((w) => w.code)).toEqual(['UNPLACED_CHANGE']);
    expect(warnings[0].message).toContain('650.0 m (± 300.0 m, 5.8 times the noise)');
  });

  it('3691 m of pair, step record, loss known: no event at 1170 m ± 357 m', () => {
    // The wet section starts at 1014.44 m (ρ −0.065); a change of level read at 1170.11 m ± 357.32 m,
    // 6.6 times the noise, was listed as a drop 156 m off it.
    const { c, a } = analyseDrawn(0x43a0c0b5, 66, true);
    expect(c.expected[0].distanceM).toBeCloseTo(1014.44, 1);
    expect(
      a.events.some((e) => Math.abs(e.distanceM - 1170.11) < 50),
      listed(a.events),
    ).toBe(false);
    const w = a.warnings.find((x) => x.code === 'UNPLACED_CHANGE');
    expect(w?.message).toContain('1170.1 m (± 357.3 m, 6.6 times the noise)');
  });

  it('162 m of coax, step record, loss unknown: the shunt at 80.6 m stays, the spread rise at 6.2 m goes', () => {
    // A rise read at 6.17 m ± 20.47 m (6.3 times the noise) was listed beside the shunt fault.
    const { c, a } = analyseDrawn(0x2a5bf72c, 61, false);
    const shunt = c.expected.find((e) => e.required)!;
    expect(shunt.distanceM).toBeCloseTo(80.57, 1);
    expect(a.events.map((e) => e.distanceM.toFixed(2))).toEqual(['80.80']);
    expect(a.events[0].type).toBe('short');
    expect(
      a.warnings.some((x) => x.code === 'UNPLACED_CHANGE' && x.message.includes('near 6.2 m')),
      listed(a.events),
    ).toBe(true);
  });
});
