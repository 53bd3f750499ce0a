import { describe, expect, it } from 'vitest';
import { analyzeTrace, parseTraceCsv, type TraceInputError } from '../../../shared/trace';
import { traceInputError } from '../../support/trace-input-error';
import { MAX_RECORD_SPAN_S, MIN_SAMPLE_INTERVAL_S } from '../../../shared/trace/bounds';

/** A step record: 600 samples `stepNs` apart, the level rising half way (header on line 1). */
function stepCsv(stepNs: number, rows = 600, header = 'time_ns,volts'): string {
  const lines = [header];
  for (let i = 0; i < rows; i++) lines.push(`${i * stepNs},${i > rows / 2 ? 0.9 : 0.4}`);
  return lines.join('\n') + '\n';
}

function refusal(csv: string): TraceInputError {
  return traceInputError(() => analyzeTrace(parseTraceCsv(csv), { vf: 0.66 }));
}

describe('time axis bounds', () => {
  it('refuses samples 1e300 ns apart, naming the time column and the last line', () => {
    const err = refusal(stepCsv(1e300));
    expect(err.code).toBe('IMPLAUSIBLE_TIME_AXIS');
    expect(err.field).toBe('time_ns');
    // 600 samples after the header on line 1: the last is on line 601.
    expect(err.line).toBe(601);
    expect(err.message).toContain("time column 'time_ns'");
    expect(err.message).toContain('line 601');
  });

  it('refuses samples 1e-300 ns apart, naming the time column and the second sample line', () => {
    const err = refusal(stepCsv(1e-300));
    expect(err.code).toBe('IMPLAUSIBLE_TIME_AXIS');
    expect(err.field).toBe('time_ns');
    expect(err.line).toBe(3);
    expect(err.message).toContain('1 fs');
  });

  it('refuses a record just over 2 ms and accepts one just under', () => {
    // 600 samples span 599 intervals.
    const over = ((MAX_RECORD_SPAN_S * 1e9) / 599) * 1.01;
    expect(refusal(stepCsv(over)).code).toBe('IMPLAUSIBLE_TIME_AXIS');
    const under = ((MAX_RECORD_SPAN_S * 1e9) / 599) * 0.99;
    const a = analyzeTrace(parseTraceCsv(stepCsv(under)), { vf: 0.66 });
    expect(a.events.length).toBeGreaterThan(0);
    for (const e of a.events) {
      expect(Number.isFinite(e.distanceM)).toBe(true);
      expect(Number.isFinite(e.uncertaintyM)).toBe(true);
    }
  });

  it('accepts a record sampled at 1 fs', () => {
    const a = analyzeTrace(parseTraceCsv(stepCsv(MIN_SAMPLE_INTERVAL_S * 1e9 * 1.001)), { vf: 0.66 });
    expect(a.sampleIntervalNs).toBeCloseTo(1.001e-6, 12);
  });

  it('names the sample interval when the file has no time column', () => {
    const csv = ['# sample_interval_ns: 1e-300', 'volts', ...Array.from({ length: 600 }, (_, i) => (i > 300 ? '0.9' : '0.4'))].join('\n');
    const err = refusal(csv);
    expect(err.code).toBe('IMPLAUSIBLE_TIME_AXIS');
    expect(err.message).toContain('the sample interval');
  });
});
