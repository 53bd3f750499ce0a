import { describe, expect, it } from 'vitest';
import { analyzeTrace, type ParsedTrace } from '../../../shared/trace';
import { WIDE_LAUNCH_SHARE } from '../../../shared/trace/analyze';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { gaussianShapes, parsedTrace } from '../../support/parsed-trace';

/**
 * A step record (1 ns samples, launch at sample 200 with a 20-sample rise, 4000 samples) into a
 * shunt of ρ = −0.98 at `roundTrip` samples: the wave comes back whole, its edge spread to 30
 * samples by the line, and nothing beyond the short shows. Until the short's echo it looks like
 * a launch pulse as wide as the round trip. The check values are the generator's inputs.
 */
const N = 4000;
const LAUNCH = 200;
const VF = 0.66;
const launchEdge = gaussianShapes(20).edge;
const returnedEdge = gaussianShapes(30).edge;

function stepIntoShort(roundTrip: number, seed: number): Float64Array {
  const rnd = gaussianSource(seed);
  return new Float64Array(N).map((_, i) => launchEdge(i - LAUNCH) - 0.98 * returnedEdge(i - LAUNCH - roundTrip) + 0.005 * rnd());
}

/** A launch pulse `width` samples wide at half height with 20-sample edges, and an echo of `echo` of it `echoAt` samples later. */
function pulseRecord(width: number, seed: number, echo = 0, echoAt = 0): Float64Array {
  const { pulse } = gaussianShapes(20);
  const rnd = gaussianSource(seed);
  return new Float64Array(N).map((_, i) => pulse(i, LAUNCH, width) + echo * pulse(i, LAUNCH + echoAt, width) + 0.005 * rnd());
}

const trace = (y: Float64Array, pulseWidthNs?: number): ParsedTrace => {
  const t = parsedTrace(y, { dtS: 1e-9, t0S: -LAUNCH * 1e-9 });
  return pulseWidthNs === undefined ? t : { ...t, hints: { pulseWidthNs } };
};

/** d = VF·c·t/2, c = 0.299792458 m/ns (SI definition), for a round trip of `samples` 1 ns samples. */
const metres = (samples: number) => (VF * 0.299792458 * samples) / 2;

describe('a step into a short that reads like a wide launch pulse', () => {
  it('is reported as a short when, read as a pulse, the launch fills the record and nothing returns', () => {
    // Round trip 1200 samples: the "pulse" would fill 1200 / 3800 = 0.32 of the record after the launch.
    expect(1200 / (N - LAUNCH)).toBeGreaterThan(WIDE_LAUNCH_SHARE);
    const a = analyzeTrace(trace(stepIntoShort(1200, 21)), { vf: VF });
    expect(a.mode).toBe('step');
    expect(a.modeDetected).toBe(true);
    expect(a.warnings.map((w) => w.code)).toContain('MODE_FROM_ECHOES');
    expect(a.events).toHaveLength(1);
    expect(a.events[0].type).toBe('short');
    // 0.66 × 0.2998 m/ns × 1200 ns / 2 = 118.7 m.
    expect(Math.abs(a.events[0].distanceM - metres(1200))).toBeLessThan(1.5);
  });

  it('is reported as a short in a record that starts during the launch', () => {
    // No pre-trigger: the record opens at the incident level, its axis starting at the launch, and
    // falls at the short's echo 800 samples in, 800 / 3000 = 0.27 of the record.
    const rnd = gaussianSource(25);
    const y = new Float64Array(3000).map((_, i) => 1 - 0.98 * returnedEdge(i - 800) + 0.005 * rnd());
    const a = analyzeTrace(parsedTrace(y, { dtS: 1e-9, t0S: 0 }), { vf: VF });
    expect(a.mode).toBe('step');
    expect(a.warnings.map((w) => w.code)).toContain('MODE_FROM_ECHOES');
    expect(a.events).toHaveLength(1);
    expect(a.events[0].type).toBe('short');
    // 0.66 × 0.2998 m/ns × 800 ns / 2 = 79.1 m.
    expect(Math.abs(a.events[0].distanceM - metres(800))).toBeLessThan(1.5);
  });

  it('keeps a launch pulse a pulse when the file states its width', () => {
    // The same record, with the file stating a 1200 ns pulse: the stated width settles it.
    const a = analyzeTrace(trace(pulseRecord(1200, 22), 1200), { vf: VF });
    expect(a.mode).toBe('pulse');
    expect(a.events.filter((e) => e.type === 'short')).toHaveLength(0);
  });

  it('keeps a launch pulse a pulse when it is narrow against the record, though nothing returns', () => {
    // 700 samples: 700 / 3800 = 0.18 of the record after the launch.
    expect(700 / (N - LAUNCH)).toBeLessThan(WIDE_LAUNCH_SHARE);
    const a = analyzeTrace(trace(pulseRecord(700, 23)), { vf: VF });
    expect(a.mode).toBe('pulse');
    expect(a.events).toHaveLength(0);
    expect(a.warnings.map((w) => w.code)).not.toContain('MODE_FROM_ECHOES');
  });

  it('keeps a wide launch pulse a pulse when an echo returns after it', () => {
    // The 1200-sample pulse with an echo of 0.3 of it 1800 samples later: 0.66 × 0.2998 × 1800 / 2 = 178.1 m.
    const a = analyzeTrace(trace(pulseRecord(1200, 24, 0.3, 1800)), { vf: VF });
    expect(a.mode).toBe('pulse');
    const near = a.events.filter((e) => Math.abs(e.distanceM - metres(1800)) < 3);
    expect(near).toHaveLength(1);
    expect(a.events.filter((e) => e.type === 'short')).toHaveLength(0);
  });
});
