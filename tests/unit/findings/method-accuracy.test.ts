import { describe, expect, it } from 'vitest';
import { summarise } from '../../../server/findings/method-scores';

/** The accuracy table's row for one method: mean, mean of sizes, and the largest miss of its close-outs. */
describe('a method accuracy row', () => {
  it('gives the mean error, the mean size of error and the largest miss by size', () => {
    const row = summarise('tdr-single-ended', null, [
      { errorM: 1.5, withinWindow: true },
      { errorM: -4, withinWindow: false },
      { errorM: 0.5, withinWindow: true },
    ]);
    expect(row.count).toBe(3);
    expect(row.meanErrorM).toBeCloseTo(-2 / 3, 12);
    expect(row.meanAbsErrorM).toBeCloseTo(2, 12);
    expect(row.maxAbsErrorM).toBe(4);
    expect(row.withinWindow).toBe(2);
  });

  it('takes any number of close-outs (a spread of 300,000 values into Math.max overflows the call stack)', () => {
    const rows = Array.from({ length: 300_000 }, (_, i) => ({ errorM: i === 123_456 ? -9.25 : (i % 7) - 3, withinWindow: i % 2 === 0 }));
    const row = summarise('tdr-single-ended', null, rows);
    expect(row.count).toBe(300_000);
    expect(row.maxAbsErrorM).toBe(9.25);
    expect(row.withinWindow).toBe(150_000);
  });
});
