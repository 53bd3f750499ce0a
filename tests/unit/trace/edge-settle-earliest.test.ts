import { describe, expect, it } from 'vitest';
import { analyzeCsv } from '../../../shared/trace';
import { earliestMiddle, FOOT_TO_MIDDLE } from '../../../shared/trace/edge-fit';
import { buildFieldCases } from '../../../scripts/sim/field-cases';

/**
 * Widening the level window after an edge may not walk its onset back before the detection allows: the
 * step filter's peak places the edge's middle to about w/snr plus half the w/4 stride it is read on, and
 * the tangent construction's onset lies no more than 0.625 of the edge's 10–90 % rise before its middle.
 */

describe('earliest onset the level widening may reach', () => {
  it('is half a stride plus three timing uncertainties w/snr before the detection, less 0.625 rise', () => {
    // w 54: stride 13, half of it 6.5; 3 · 54 / 5.4 = 30.
    expect(earliestMiddle({ i: 1054, w: 54, snr: 5.4 })).toBeCloseTo(1054 - 6.5 - 30, 6);
    // A clear edge is held close to its detection: w 40, stride 10; 3 · 40 / 120 = 1.
    expect(earliestMiddle({ i: 1000, w: 40, snr: 120 })).toBeCloseTo(1000 - 5 - 1, 6);
    // A ramp runs 0–100 % in rise/0.8; its foot lies half of that before its middle.
    expect(FOOT_TO_MIDDLE).toBe(0.625);
  });

  it('a series 15 Ω fault at 37 m of coax under noise a quarter of its step: read at 37 m, not 5.7 m early', () => {
    // The hand-made field case (scripts/sim/field-cases.ts, seed 5010): detected at sample 1054 (w 54,
    // snr 5.4), first read with its onset at 1043.8 and a rise of 17 samples. The level read further out
    // changed by 8 %, but its 50 % crossing fell on a later noise excursion, and the onset walked back to
    // 929.7 (a rise of 113 samples), 75 samples before the detection allows; the line fit then kept that
    // reading, 31.26 m.
    const c = buildFieldCases().find((f) => f.id === 'f10-coax-step-series-15ohm-noisy')!;
    expect(c.expected).toHaveLength(1);
    expect(c.expected[0].distanceM).toBe(37);
    const a = analyzeCsv(c.csv, {}, { vf: c.vf, z0Ohm: c.z0Ohm });
    expect(a.events).toHaveLength(1);
    expect(a.events[0].type).toBe('impedance-rise');
    expect(Math.abs(a.events[0].distanceM - 37)).toBeLessThanOrEqual(0.5);
    expect(a.events[0].reflectionCoefficient).toBeGreaterThan(0.1);
    expect(a.events[0].reflectionCoefficient).toBeLessThan(0.2);
  });
});
