import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { erfStepTrace, parsedTrace } from '../../support/parsed-trace';

/**
 * A shunt fault followed by the cable's open end, against a low-impedance section whose closing edge
 * reads the same. Hand-made step traces on a 50 Ω line, 1 ns samples, matched source, launch at sample
 * 100, first edge at 400, second at 600.
 *
 * A 37.5 Ω shunt: ρ = −Z0/(2R + Z0) = −50/125 = −0.4, passing 1 + ρ = 0.6 each way, so the open end
 * reads 0.6² = 0.36. The end's wave comes back to the shunt, is sent back to the end with the shunt's
 * own −0.4 and returns one gap later: 0.36·(−0.4) = −0.144 at sample 800, then +0.0576 at 1000.
 * A section of ρ = −0.4 (50 Ω to 21.4 Ω and back) passes T·T′ = 1 − 0.4² = 0.84, so its closer reads
 * 0.84·0.4 = 0.336; its wave bounces inside the section off the start seen from within, +0.4, so the
 * copy at 800 is 0.84·0.4³ = +0.054 (D. M. Pozar, "Microwave Engineering", 4th ed., §2.3; the bounce
 * diagram: L. V. Bewley, "Traveling Waves on Transmission Systems", 2nd ed., ch. 3).
 */
const stepTrace = (n: number, parts: Array<{ at: number; height: number }>) => erfStepTrace(n, parts, 0x1b873593);

const analyse = (y: Float64Array) => analyzeTrace(parsedTrace(y, { dtS: 1e-9 }), { vf: 0.66, z0Ohm: 50 });
const at = (a: ReturnType<typeof analyse>, ns: number) =>
  a.events.find((e) => e.likelyMultipleOf === null && Math.abs(e.roundTripNs - ns) < 5);

describe('an edge that closes what looks like a section', () => {
  it('is read as the open end behind a shunt when its bounce off the shunt comes back with the shunt’s sign', () => {
    const a = analyse(
      stepTrace(1400, [
        { at: 100, height: 1 },
        { at: 400, height: -0.4 },
        { at: 600, height: 0.36 },
        { at: 800, height: -0.144 },
        { at: 1000, height: 0.0576 },
        { at: 1200, height: -0.023 },
      ]),
    );
    const shunt = at(a, 300);
    const end = at(a, 500);
    expect(shunt?.reflectionCoefficient).toBeCloseTo(-0.4, 1);
    expect(end?.reflectionCoefficient).toBeCloseTo(1, 1);
    expect(end?.type).toBe('open');
  });

  it('keeps a section’s closer as an impedance rise when its bounce comes back with its own sign', () => {
    const a = analyse(
      stepTrace(1400, [
        { at: 100, height: 1 },
        { at: 400, height: -0.4 },
        { at: 600, height: 0.336 },
        { at: 800, height: 0.054 },
      ]),
    );
    const closer = at(a, 500);
    expect(closer?.reflectionCoefficient).toBeCloseTo(0.4, 1);
    expect(closer?.type).toBe('impedance-rise');
  });

  it('is read as the open end behind a shunt when the record ends before the bounce could come back', () => {
    // The same shunt and end, recorded to sample 720: the bounce at 800 is past the record, so nothing
    // shows a section running on beyond it; the fault in front of the end is the reading.
    const a = analyse(
      stepTrace(720, [
        { at: 100, height: 1 },
        { at: 400, height: -0.4 },
        { at: 600, height: 0.36 },
      ]),
    );
    const end = at(a, 500);
    expect(at(a, 300)?.reflectionCoefficient).toBeCloseTo(-0.4, 1);
    expect(end?.reflectionCoefficient).toBeCloseTo(1, 1);
    expect(end?.type).toBe('open');
    expect(end?.isCableEnd).toBe(true);
  });
});
