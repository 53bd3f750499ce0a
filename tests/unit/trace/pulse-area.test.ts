import { describe, expect, it } from 'vitest';
import { buildSweep } from '../../../scripts/sim/sweep';
import { analyzeCsv } from '../../../shared/trace';

// A pulse echo's area is lowered only by the line's DC resistance: skin loss spreads the
// echo but keeps its area (its transfer function is 1 at 0 Hz; the telegrapher's equations,
// R' = R_dc + R_s·√f). A loss estimated from the edges' shape has no resistive term, so the
// engine must not call such a ρ corrected. Traces: the sweep's 300 m and 500 m telecom pairs
// (R_dc 0.18 Ω/m, scripts/sim/cables.ts), analysed with no loss given.
const cases = buildSweep();
const byId = (prefix: string) => cases.find((c) => c.id.startsWith(prefix))!;

describe('ρ of a pulse echo on a resistive line with no loss given', () => {
  it('is reported as not corrected for loss, with a warning that its size is a lower bound', () => {
    const c = byId('23-pair-100-300m-short-pulse');
    const a = analyzeCsv(c.csv, {}, { vf: c.vf, z0Ohm: c.z0Ohm });
    expect(a.mode).toBe('pulse');
    const end = a.events.find((e) => Math.abs(e.distanceM - 300) < 3)!;
    expect(end.type).toBe('short');
    expect(end.lossCorrected).toBe(false);
    // Lowered by the resistance, never raised: a lower bound on |ρ| of the 1 Ω short (ρ ≈ −1).
    expect(end.reflectionCoefficient).toBeLessThan(0);
    expect(Math.abs(end.reflectionCoefficient)).toBeLessThan(1);
    const w = a.warnings.find((x) => x.code === 'PULSE_LOSS')!;
    expect(w.message).toContain('lower bound');
  });

  it('stays corrected on a step record of the same pair, where the step’s rise gives the resistance', () => {
    const c = byId('22-pair-100-300m-short-step');
    const a = analyzeCsv(c.csv, {}, { vf: c.vf, z0Ohm: c.z0Ohm });
    expect(a.mode).toBe('step');
    const end = a.events.find((e) => Math.abs(e.distanceM - 300) < 3)!;
    expect(end.lossCorrected).toBe(true);
    expect(end.reflectionCoefficient).toBeLessThan(-0.75);
  });
});
