import { describe, expect, it } from 'vitest';
import { libraryLoss, lossyLineTrace } from './support/lossy-line';
import { analyzeCsv } from '../../../shared/trace';
import { COAX_50 } from '../../../scripts/sim/cables';
import { type CableModel } from '../../../scripts/sim/line-model';
import { drawCase } from '../../../scripts/sim2/cases';

/**
 * A resistive cable end on a lossy line, with the cable's loss known: the end sends back a plain edge plus
 * the incident creep reversed (the line's own impedance grows at low frequency; D. M. Pozar, "Microwave
 * Engineering", 4th ed., §2.3 and §2.7). Read as a plain edge, that slow tail puts the end late, or
 * adds a drop past it. The check values are where the simulators put the end, and its ρ = (R − Z0)/(R + Z0)
 * (Pozar §2.3); the distance tolerance is the product's, max(0.5 m, 1 %).
 */

const tolM = (d: number) => Math.max(0.5, 0.01 * d);

const describeEvents = (events: Array<{ distanceM: number; type: string; reflectionCoefficient: number }>) =>
  JSON.stringify(events.map((e) => [e.distanceM.toFixed(2), e.type, e.reflectionCoefficient.toFixed(3)]));


/**
 * A pulse into `lengthM` of cable ending in `rOhm`, from a source of its nominal impedance, recorded for
 * `span` round trips, from the frequency-domain simulator (scripts/sim/line-model.ts), with seeded noise
 * of 0.03 % of the incident wave.
 */
const terminatedPulseTrace = (cable: CableModel, lengthM: number, rOhm: number, span: number) =>
  lossyLineTrace(cable, lengthM, { elements: [{ kind: 'line', lengthM, cable }], termination: { kind: 'load', rOhm } }, { mode: 'pulse', noiseV: 0.0003, spanRoundTrips: span });

describe('a matched end on a lossy coax, pulse record, with the cable’s loss known', () => {
  for (const [lengthM, span] of [
    [400, 1.6],
    [250, 2.3],
  ] as const) {
    it(`reads a ${lengthM} m coax's end of Z0 at the end with ρ about 0, nothing else (record of ${span} round trips)`, () => {
      const a = analyzeCsv(
        terminatedPulseTrace(COAX_50, lengthM, COAX_50.z0Ohm, span),
        {},
        { vf: COAX_50.vf, z0Ohm: COAX_50.z0Ohm, loss: libraryLoss(COAX_50) },
      );
      // On a flat level the end was read as a drop of ρ ≈ −0.05, 14.6 m late at 400 m and 5.1 m late at 250 m.
      expect(a.events.length, describeEvents(a.events)).toBe(1);
      expect(Math.abs(a.events[0].distanceM - lengthM), describeEvents(a.events)).toBeLessThanOrEqual(tolM(lengthM));
      expect(Math.abs(a.events[0].reflectionCoefficient)).toBeLessThan(0.02);
    });
  }
});

/** A case of the second simulator (scripts/sim2, finite differences with the line's loss), drawn from a fixed seed. */
function analyseDrawn(seed: number, index: number) {
  const c = drawCase(seed, index, 'unit');
  const a = analyzeCsv(c.csv, c.parseOptions ?? {}, { vf: c.vf, z0Ohm: c.z0Ohm, loss: c.loss });
  return { c, a };
}

describe('resistive ends read with the creep share the record holds', () => {
  it('a 64 Ω end on 843 m of lossy 50 Ω coax, step record: at the end, not 21 m past it', () => {
    const { c, a } = analyseDrawn(0x4a52fdac, 78);
    expect(c.mode).toBe('step');
    const end = c.expected.find((e) => e.what.startsWith('cable end'))!;
    expect(end.distanceM).toBeCloseTo(831.94, 1);
    expect(end.rho).toBeCloseTo(0.235, 2);
    const last = a.events[a.events.length - 1];
    // With the full share −(1 − ρ²) the end was read at 853.19 m.
    expect(Math.abs(last.distanceM - end.distanceM), describeEvents(a.events)).toBeLessThanOrEqual(tolM(end.distanceM));
    expect(last.reflectionCoefficient).toBeGreaterThan(0.15);
    expect(last.reflectionCoefficient).toBeLessThan(0.3);
  });

  it('a matched end on 402 m of lossy 50 Ω coax, pulse record: at the end, no drop 6 m past it', () => {
    const { c, a } = analyseDrawn(0x51a2a3ec, 55);
    expect(c.mode).toBe('pulse');
    const end = c.expected.find((e) => e.what.startsWith('cable end'))!;
    expect(end.distanceM).toBeCloseTo(402.2, 1);
    expect(end.rho).toBe(0);
    // On a flat level the end was a drop of ρ ≈ −0.05 at 408.02 m, outside the tolerance.
    const beyond = a.events.filter((e) => e.distanceM > 100);
    expect(beyond.length, describeEvents(a.events)).toBe(1);
    expect(Math.abs(beyond[0].distanceM - end.distanceM), describeEvents(a.events)).toBeLessThanOrEqual(tolM(end.distanceM));
    expect(Math.abs(beyond[0].reflectionCoefficient)).toBeLessThan(0.02);
  });
});
