import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { erfStepTrace, parsedTrace } from '../../support/parsed-trace';

/**
 * The last edge of a short pair read through an instrument whose source does not match the line.
 * A 50 Ω source on 100 Ω pair reflects returning waves with ρs = (50 − 100)/(50 + 100) = −1/3 and
 * passes 1 + ρs = 2/3 of them into the instrument (D. M. Pozar, "Microwave Engineering", 4th ed.,
 * eq. 2.35), so an open end reads 2/3 at the port. A 500 Ω end on the same pair behind a matched
 * source reads the same: ρ = (500 − 100)/(500 + 100) = 2/3. The two differ only in the second arrival,
 * one round trip later, off the source: (1 + ρs)·ρs·ρ² = −2/9 for the open, nothing for the matched
 * source. Hand-made step traces: 1 ns samples, the launch at sample 100, the end's edge at sample 700.
 */
const LAUNCH = 100;
const END = 700;

const stepTrace = (n: number, parts: Array<{ at: number; height: number }>) => erfStepTrace(n, parts, 0x2545f491);

const analyse = (y: Float64Array) => analyzeTrace(parsedTrace(y, { dtS: 1e-9 }), { vf: 0.66, z0Ohm: 100 });
const lastEvent = (y: Float64Array) => {
  const a = analyse(y);
  const primaries = a.events.filter((e) => e.likelyMultipleOf === null);
  return primaries[primaries.length - 1];
};

describe('a last edge whose source reflection the record cannot show', () => {
  it('is read as an open end when the record ends before its second arrival', () => {
    // Record of 1200 samples: the second arrival off the source would start at sample 1300.
    const end = lastEvent(
      stepTrace(1200, [
        { at: LAUNCH, height: 1 },
        { at: END, height: 2 / 3 },
      ]),
    );
    expect(end.distanceM).toBeCloseTo((600e-9 * 0.66 * 299_792_458) / 2, 0);
    expect(end.reflectionCoefficient).toBeCloseTo(2 / 3, 1);
    expect(end.type).toBe('open');
    expect(end.isCableEnd).toBe(true);
  });

  it('is read as a resistive end where the record shows no second arrival', () => {
    // Record of 2000 samples, flat past the end: the source is matched and the end is 500 Ω.
    const end = lastEvent(
      stepTrace(2000, [
        { at: LAUNCH, height: 1 },
        { at: END, height: 2 / 3 },
      ]),
    );
    expect(end.reflectionCoefficient).toBeCloseTo(2 / 3, 1);
    expect(end.type).toBe('impedance-rise');
    expect(end.impedanceOhm).toBeCloseTo(500, -1);
  });

  it('is read as an open end from its second arrival off a mismatched source', () => {
    const a = analyse(
      stepTrace(2000, [
        { at: LAUNCH, height: 1 },
        { at: END, height: 2 / 3 },
        { at: END + (END - LAUNCH), height: -2 / 9 },
      ]),
    );
    const end = a.events.find((e) => e.likelyMultipleOf === null && Math.abs(e.roundTripNs - 600) < 5);
    expect(end?.type).toBe('open');
    expect(end?.reflectionCoefficient).toBeCloseTo(1, 1);
  });
});
