import { describe, expect, it } from 'vitest';
import { analyzeTrace, type ParsedTrace } from '../../../shared/trace';

/**
 * A pulse record whose launch is wide (150 samples of 4 ns, rise 28) beside a cable that is short
 * for it: the record climbs to the launch, falls back to its baseline, and climbs again for the
 * open end's echo 250 samples later. Read as a step record it would be a short at 56 m with the line
 * seen beyond it, which no cable can show. The check values are the generator's inputs.
 */
function record(echoAt: number | null): ParsedTrace {
  const n = 700;
  const dt = 4e-9;
  const erf = (x: number) => {
    // Abramowitz & Stegun 7.1.26
    const s = Math.sign(x);
    const a = Math.abs(x);
    const t = 1 / (1 + 0.3275911 * a);
    return s * (1 - ((((1.061405429 * t - 1.453152027) * t + 1.421413741) * t - 0.284496736) * t + 0.254829592) * t * Math.exp(-a * a));
  };
  const edge = (i: number, at: number) => 0.5 * (1 + erf((i - at) / 12));
  const pulse = (i: number, at: number) => edge(i, at) - edge(i, at + 150);
  let seed = 3;
  const rnd = () => {
    seed = (seed * 16807) % 2147483647;
    return seed / 2147483647 - 0.5;
  };
  const timeS = new Float64Array(n);
  const amplitude = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    timeS[i] = (i - 50) * dt;
    amplitude[i] = pulse(i, 50) + (echoAt === null ? 0 : 0.97 * pulse(i, 50 + echoAt)) + 0.02 * rnd();
  }
  return {
    timeS,
    amplitude,
    amplitudeUnit: 'V',
    metadata: {},
    hints: {},
    layout: { kind: 'time-amplitude', delimiter: ',', decimal: '.', timeUnit: 's', amplitudeUnit: 'V' },
    warnings: [],
  } as unknown as ParsedTrace;
}

describe('a wide pulse record with no stated width', () => {
  it('is read as a pulse record when a step reading would show the line past a short', () => {
    const a = analyzeTrace(record(250), { vf: 0.58 });
    expect(a.mode).toBe('pulse');
    expect(a.warnings.map((w) => w.code)).toContain('MODE_FROM_ECHOES');
    // Round trip 250 samples of 4 ns at VF 0.58: d = VF·c·t/2 = 86.9 m.
    const open = a.events.filter((e) => e.likelyMultipleOf === null);
    expect(open).toHaveLength(1);
    expect(open[0].type).toBe('open');
    expect(Math.abs(open[0].distanceM - 86.9)).toBeLessThan(1.5);
  });

  it('keeps a step reading that ends at a short with nothing past it', () => {
    // The same launch with no echo: nothing past the fall, so whatever mode the launch gives stands.
    const a = analyzeTrace(record(null), { vf: 0.58 });
    expect(a.warnings.map((w) => w.code)).not.toContain('MODE_FROM_ECHOES');
  });
});
