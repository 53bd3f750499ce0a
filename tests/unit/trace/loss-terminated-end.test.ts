import { describe, expect, it } from 'vitest';
import { libraryLoss, lossyLineTrace } from './support/lossy-line';
import { analyzeCsv } from '../../../shared/trace';
import { PAIR_04 } from '../../../scripts/sim/cables';
import { type CableModel } from '../../../scripts/sim/line-model';

/**
 * A resistor at the far end of a lossy line. The line's own impedance grows at low frequency (series
 * loss), so even a resistor equal to the nominal Z0 reflects: Γ = (R − Zc)/(R + Zc), the incident
 * step's creep reversed from the end's round trip on. The traces come from the frequency-domain
 * simulator (scripts/sim/line-model.ts: the exact input impedance of the terminated line, Pozar §2.7
 * and §4.4); the check values are where the resistor was put and ρ = (R − Z0)/(R + Z0) (Pozar §2.3).
 */


/** A step into `lengthM` of cable ending in `rOhm`, from a source of its nominal impedance, with seeded noise of 0.2 % of the step. */
const terminatedTrace = (cable: CableModel, lengthM: number, rOhm: number) =>
  lossyLineTrace(cable, lengthM, { elements: [{ kind: 'line', lengthM, cable }], termination: { kind: 'load', rOhm } }, { noiseV: 0.002 });

const describeEvents = (events: Array<{ distanceM: number; type: string; reflectionCoefficient: number }>) =>
  JSON.stringify(events.map((e) => [e.distanceM.toFixed(2), e.type, e.reflectionCoefficient.toFixed(3)]));

describe('a resistive end on a lossy pair, with the cable’s loss known', () => {
  const cable = PAIR_04;
  const lengthM = 300;
  const tolM = Math.max(0.5, 0.01 * lengthM); // the product's distance requirement

  it('reads an end of the nominal impedance at the end, as a load of about Z0, with nothing past it', () => {
    const a = analyzeCsv(terminatedTrace(cable, lengthM, cable.z0Ohm), {}, { vf: cable.vf, z0Ohm: cable.z0Ohm, loss: libraryLoss(cable) });
    const end = a.events.find((e) => Math.abs(e.distanceM - lengthM) <= tolM);
    expect(end, describeEvents(a.events)).toBeDefined();
    // ρ of a matched load is 0; its slow echo is the line's creep, not a drop in impedance.
    expect(Math.abs(end!.reflectionCoefficient)).toBeLessThan(0.03);
    expect(end!.impedanceOhm).not.toBeNull();
    expect(Math.abs(end!.impedanceOhm! - cable.z0Ohm)).toBeLessThan(0.06 * cable.z0Ohm);
    expect(a.events.filter((e) => e.distanceM > lengthM + tolM)).toEqual([]);
  });

  it('reads a 140 Ω end on the 120 Ω pair as a rise of ρ = 20/260 at the end', () => {
    const a = analyzeCsv(terminatedTrace(cable, lengthM, 140), {}, { vf: cable.vf, z0Ohm: cable.z0Ohm, loss: libraryLoss(cable) });
    const end = a.events.find((e) => Math.abs(e.distanceM - lengthM) <= tolM);
    expect(end, describeEvents(a.events)).toBeDefined();
    expect(end!.type).toBe('impedance-rise');
    expect(end!.reflectionCoefficient).toBeCloseTo((140 - 120) / (140 + 120), 1);
    expect(a.events.filter((e) => e.distanceM > lengthM + tolM)).toEqual([]);
  });

  it('reads a 100 Ω end as a drop at the end', () => {
    const a = analyzeCsv(terminatedTrace(cable, lengthM, 100), {}, { vf: cable.vf, z0Ohm: cable.z0Ohm, loss: libraryLoss(cable) });
    const end = a.events.find((e) => Math.abs(e.distanceM - lengthM) <= tolM);
    expect(end, describeEvents(a.events)).toBeDefined();
    expect(end!.type).toBe('impedance-drop');
    expect(end!.reflectionCoefficient).toBeCloseTo((100 - 120) / (100 + 120), 1);
    expect(a.events.filter((e) => e.distanceM > lengthM + tolM)).toEqual([]);
  });
});
