import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { erfStepTrace, parsedTrace } from '../../support/parsed-trace';

/**
 * A fault seen through a section: a change of line passes 1 + ρ one way and 1 − ρ the other,
 * T·T′ = 1 − ρ² out and back (D. M. Pozar, "Microwave Engineering", 4th ed., §2.3), at the section's
 * start and at its closing edge alike. Hand-made step trace on a 50 Ω line, 1 ns samples, matched
 * source and end: launch at sample 100, a section of ρ = −0.2 from sample 300 to 400 (its closer reads
 * 0.96·0.2 = 0.192), and a shunt of own ρ = −0.3 at sample 600, read through both edges as
 * 0.96²·(−0.3) = −0.276.
 */
const stepTrace = (n: number, parts: Array<{ at: number; height: number }>) => erfStepTrace(n, parts, 0x3c6ef372);

describe('a fault behind a section', () => {
  it('is read through 1 − ρ² at the section’s closing edge as at its start', () => {
    const a = analyzeTrace(
      parsedTrace(
        stepTrace(1200, [
          { at: 100, height: 1 },
          { at: 300, height: -0.2 },
          { at: 400, height: 0.192 },
          { at: 600, height: -0.2765 },
        ]),
        { dtS: 1e-9 },
      ),
      { vf: 0.66, z0Ohm: 50 },
    );
    const at = (ns: number) => a.events.find((e) => e.likelyMultipleOf === null && Math.abs(e.roundTripNs - ns) < 5);
    expect(at(200)?.reflectionCoefficient).toBeCloseTo(-0.2, 1);
    expect(at(300)?.reflectionCoefficient).toBeCloseTo(0.2, 1);
    const shunt = at(500);
    expect(shunt?.reflectionCoefficient).toBeCloseTo(-0.3, 1);
    expect(shunt?.type).toBe('impedance-drop');
    // Z = 50·(1 − 0.3)/(1 + 0.3) = 26.9 Ω: a shunt of 37.5 Ω across the 50 Ω line beyond it.
    expect(shunt?.impedanceOhm).toBeCloseTo(26.9, -1);
  });
});
