import { describe, expect, it } from 'vitest';
import type { ReflectionEvent } from '../../../shared/schemas/trace-analysis';
import { analyzeCsv } from '../../../shared/trace';
import { dropUnplaced } from '../../../shared/trace/analyze';
import { drawCase } from '../../../scripts/sim2/cases';

/**
 * A weak change of level that the edge fit can time only to within a fifth of its own distance (the
 * timing term of its window) is not listed as an event: it is a slow change (a wander of the noise, the
 * foot of a far edge), not an edge off a discontinuity, and no distance can be given for it. A far echo
 * spread by loss, timed well but with a wide window from the loss model, stays (detect-coarse-edge-lobe). The record's warnings say where it lay. The traces are cases of the second simulator (scripts/sim2,
 * finite differences of the telegrapher's equations with the line's loss), drawn from fixed seeds; the
 * check values are where it put the events.
 */

const ev = (distanceM: number, timingM: number, snr: number, likelyMultipleOf: number | null, index: number, lossM = 0) =>
  ({
    index,
    distanceM,
    uncertaintyM: 2 * Math.hypot(timingM, lossM),
    uncertaintyBudget: { vfM: 0, samplingM: 0, timingM, lossM, dispersionM: 0, combinedM: Math.hypot(timingM, lossM) },
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
  it('drops a weak event timed to worse than a fifth of its distance, with its echo, and keeps the rest', () => {
    // Standard uncertainties; the window's timing term is twice them (k = 2).
    const events = [
      ev(50, 0.6, 30, null, 0), // timed well and strong
      ev(650, 150, 5.8, null, 1), // timed to ± 46 % at 5.8 σ: dropped
      ev(1300, 10, 5.5, 1, 2), // its echo goes with it, though timed to 2 %
      ev(1280, 200, 19.6, null, 3), // as spread, but standing well out of the noise: kept
      ev(3.5, 0.3, 8.8, null, 4), // weak, but timed to 17 % of its distance: kept
      ev(1395, 4.6, 6.6, null, 5, 110), // weak, a window of ± 16 % from the loss model, timed to 0.7 %: kept
    ];
    const warnings = dropUnplaced(events);
    expect(events.map((e) => [e.distanceM, e.index])).toEqual([
      [50, 0],
      [1280, 1],
      [3.5, 2],
      [1395, 3],
    ]);
    expect(warnings.map((w) => w.code)).toEqual(['UNPLACED_CHANGE']);
    expect(warnings[0].message).toContain('650.0 m (timed to ± 300.0 m, 5.8 times the noise)');
  });

  it('3691 m of pair, step record, loss unknown: no event at 649 m timed to ± 300 m', () => {
    // The wet section starts at 1014.44 m (ρ −0.065); a rise read at 649.09 m ± 300.50 m (its timing
    // term 300.1 m), 5.8 times the noise, was listed where the line has nothing.
    const { c, a } = analyseDrawn(0x43a0c0b5, 66, false);
    expect(c.expected[0].distanceM).toBeCloseTo(1014.44, 1);
    expect(
      a.events.some((e) => Math.abs(e.distanceM - 649.09) < 50),
      listed(a.events),
    ).toBe(false);
    const w = a.warnings.find((x) => x.code === 'UNPLACED_CHANGE');
    expect(w?.message).toContain('649.1 m (timed to ± 300.1 m, 5.8 times the noise)');
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
