import { describe, expect, it } from 'vitest';
import type { ParsedTrace } from '../../shared/trace';
import { samplePoints } from '../../server/traces/traces.service';

/** A 10,000-sample record, 1 ns apart, with a step at sample 6,000. */
function record(): ParsedTrace {
  const n = 10_000;
  const timeS = new Float64Array(n);
  const amplitude = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    timeS[i] = i * 1e-9;
    amplitude[i] = i >= 6000 ? 1 : 0;
  }
  return { timeS, amplitude } as unknown as ParsedTrace;
}

describe('a trace page’s reduced samples', () => {
  it('are worked out once per point count and shared by every view of the same cached samples', () => {
    const parsed = record();
    const first = samplePoints(parsed, 500);
    expect(samplePoints(parsed, 500)).toBe(first);
    // Min-max reduction: at most two points per bucket, on the file's axis in ns, keeping the step's two levels.
    expect(first.length).toBeLessThanOrEqual(1000);
    expect(first[0].t).toBe(0);
    // The last point lies in the last of the 500 buckets of 20 samples.
    expect(first[first.length - 1].t).toBeGreaterThanOrEqual(9980);
    expect(Math.min(...first.map((p) => p.y))).toBe(0);
    expect(Math.max(...first.map((p) => p.y))).toBe(1);
    const other = samplePoints(parsed, 200);
    expect(other).not.toBe(first);
    expect(other.length).toBeLessThanOrEqual(400);
    // Another record's samples are never answered from this one's.
    expect(samplePoints(record(), 500)).not.toBe(first);
  });

  it('keeps four point counts per trace: a fifth pushes out the one kept longest', () => {
    const parsed = record();
    const kept = [100, 200, 300, 400].map((n) => samplePoints(parsed, n));
    expect(samplePoints(parsed, 400)).toBe(kept[3]);
    samplePoints(parsed, 500);
    expect(samplePoints(parsed, 100)).not.toBe(kept[0]);
    expect(samplePoints(parsed, 100)).toEqual(kept[0]);
  });
});
