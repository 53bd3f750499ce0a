import { describe, expect, it } from 'vitest';
import { analyzeCsv, MAX_FITTED_CANDIDATES } from '../../../shared/trace';
import { traceAnalysisSchema } from '../../../shared/schemas/trace-analysis';

describe('records no cable could have made', () => {
  it('fits only the strongest of thousands of like features and says so (a pulse every 60 ps for 120 ns)', () => {
    const rows = ['time_ps,voltage_V'];
    for (let i = 0; i < 120_000; i++) rows.push(`${i},${Math.exp(-Math.pow(((i % 60) - 30) / 2, 2)) * (1 - i / 400_000)}`);
    const a = analyzeCsv(rows.join('\n'), {}, { vf: 0.66, z0Ohm: 50, mode: 'pulse' });
    const capped = a.warnings.find((w) => w.code === 'CLUTTER' && w.message.includes('candidate edges'));
    expect(capped?.message).toMatch(new RegExp(`^the record holds (\\d+) candidate edges, far more than a cable holds; only the ${MAX_FITTED_CANDIDATES} `));
    expect(Number(/holds (\d+)/.exec(capped!.message)![1])).toBeGreaterThan(1000);
    expect(a.events.length).toBeLessThanOrEqual(MAX_FITTED_CANDIDATES);
    expect(traceAnalysisSchema.safeParse(a).success).toBe(true);
  });

  it('times a record whose launch is its very first sample from the launch, with a blind zone in metres', () => {
    const rows = ['time_ns,voltage_V'];
    for (let i = 0; i < 64; i++) rows.push(`${i},${i === 0 ? 1 : 0}`);
    const a = analyzeCsv(rows.join('\n'), {}, { vf: 0.66, z0Ohm: 50, mode: 'step' });
    // Was NaN (written as null): the launch's onset was measured against a baseline of no samples.
    expect(Number.isFinite(a.blindZoneM)).toBe(true);
    expect(a.blindZoneM).toBeGreaterThanOrEqual(0);
    expect(traceAnalysisSchema.safeParse(a).success).toBe(true);
  });
});
