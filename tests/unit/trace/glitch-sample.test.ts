import { describe, expect, it } from 'vitest';
import { analyzeCsv, parseTraceCsv, type TraceInputError } from '../../../shared/trace';
import { traceInputError } from '../../support/trace-input-error';

/**
 * A step record of a 1 ns-per-sample recorder on a line open at sample 400 (the level doubles there, an
 * open's ρ = +1: D. M. Pozar, "Microwave Engineering", 4th ed., §2.3), with a little deterministic noise.
 * Row k of the body is line k + 2 of the file (one header line).
 */
function stepCsv(glitchAt?: number, glitch = 1e308): string {
  const rows = ['time_ns,amplitude_V'];
  for (let i = 0; i < 1000; i++) {
    const level = i < 50 ? 0 : i < 400 ? 1 : 2;
    const noise = 0.002 * Math.sin(i * 12.9898) * Math.cos(i * 78.233);
    rows.push(`${i},${i === glitchAt ? glitch : (level + noise).toFixed(5)}`);
  }
  return rows.join('\n');
}

function failure(text: string): TraceInputError {
  return traceInputError(() => parseTraceCsv(text));
}

describe('a glitch sample far beyond the rest of the trace', () => {
  it('is refused with its line, not read as the scale of the whole record', () => {
    const err = failure(stepCsv(700));
    expect(err.code).toBe('GLITCH_SAMPLE');
    expect(err.line).toBe(702);
    expect(err.message).toMatch(
      /^line 702: the amplitude 1\.00e\+308 in column 'amplitude_V' is more than a million times beyond/,
    );
  });

  it('is refused below zero too, and at the first row', () => {
    expect(failure(stepCsv(0, -3e20)).line).toBe(2);
  });

  it('leaves the same record without the glitch to be read: the open at 400 ns, 40 m at VF 0.667', () => {
    const a = analyzeCsv(stepCsv(), {}, { vf: 0.667, z0Ohm: 50 });
    const open = a.events.find((e) => e.type === 'open');
    expect(open).toBeDefined();
    // (400 − 50) ns round trip × 0.667 × c / 2 = 35.0 m.
    expect(open!.distanceM).toBeCloseTo((350e-9 * 0.667 * 299_792_458) / 2, 0);
  });

  it('keeps a pulse launch that stands 10,000 times out of a quiet baseline', () => {
    const rows = ['time_ns,amplitude_V'];
    for (let i = 0; i < 4000; i++) {
      const launch = i >= 100 && i < 104 ? 10 : 0;
      rows.push(`${i},${(launch + 0.001 * Math.sin(i * 12.9898) * Math.cos(i * 78.233)).toFixed(6)}`);
    }
    expect(parseTraceCsv(rows.join('\n')).amplitude[101]).toBeCloseTo(10, 2);
  });
});
