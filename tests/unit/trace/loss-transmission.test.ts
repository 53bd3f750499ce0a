import { describe, expect, it } from 'vitest';
import { classifyEvent, ownReflections } from '../../../shared/trace/classify';
import type { Measured } from '../../../shared/trace/steps';

/**
 * A later event's own ρ is its height at the instrument over the round-trip transmission of
 * what stands in front of it: 1 − ρ² through a change of line (T·T′ = (1 + ρ)(1 − ρ), D. M. Pozar,
 * "Microwave Engineering", 4th ed., §2.3), (1 − |ρ|)² through a lumped resistor (a shunt R passes
 * 2R/(2R + Z0) = 1 + ρ each way).
 */
const edge = (h: number, at: number): Measured => ({
  onsetIdx: at,
  t50Idx: at,
  riseSamples: 4,
  height: h,
  peakDev: h,
  blip: false,
  snr: 50,
  w: 4,
  endIdx: at + 8,
  fLo: 0.1,
  echoPeak: h,
  levelBefore: 0,
  stillMoving: 0,
});

describe('transmission through earlier discontinuities', () => {
  it('refers a section’s far edge through 1 − ρ² when nothing shows after it', () => {
    // A wet stretch on 100 Ω reading 80 Ω: ρ = −20/180 = −0.111 in, +0.111 out; the way out is seen
    // through the way in, 0.111·(1 − 0.111²) = 0.1096 at the instrument.
    const r = 20 / 180;
    const own = ownReflections([edge(-r, 100), edge(r * (1 - r * r), 300)], [false, false]);
    expect(own[1].transmission).toBeCloseTo(1 - r * r, 9);
    expect(own[1].rho).toBeCloseTo(r, 9);
  });

  it('reads a bridged tap’s stub end through the junction as a change of line, not an open', () => {
    // A stub of the line's own Z0 bridged on: the junction sees Z0/2, ρ = −1/3; the open stub end
    // comes back through it as (1 − 1/3)² = 4/9 of the wave (Pozar §2.3 for each crossing).
    const own = ownReflections([edge(-1 / 3, 100), edge(4 / 9, 300)], [false, false]);
    expect(own[1].rho).toBeCloseTo(4 / 9 / (1 - 1 / 9), 9); // 0.5
    expect(classifyEvent(edge(4 / 9, 300), own[1], 4)).toBe('impedance-rise');
  });

  it('still refers an end past a lumped fault through (1 − |ρ|)²', () => {
    // An 8.33 Ω shunt on 50 Ω: ρ = −0.75; an open past it shows 0.25² = 0.0625 (ratio 0.08: not a section).
    const own = ownReflections([edge(-0.75, 100), edge(0.0625, 300)], [false, false]);
    expect(own[1].transmission).toBeCloseTo(0.0625, 9);
    expect(own[1].rho).toBeCloseTo(1, 9);
  });
});
