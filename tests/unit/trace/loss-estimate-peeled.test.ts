import { describe, expect, it } from 'vitest';
import { analyzeCsv } from '../../../shared/trace';
import { drawCase } from '../../../scripts/sim2/cases';

/**
 * A pulse record of a cable whose loss the library does not give: the skin term is read from the shape of the
 * clearest echo. When earlier echoes come before it, their long skin tails run on into its window, and with
 * nothing taken out the fit read the spread of those tails as this echo's own: the loss came out high, and every
 * echo, fitted with that loss, read early. The events are now fitted once with the first estimate, the earlier
 * echoes' fitted shapes are taken out of the clearest one's window (as the line fit does for every later event),
 * and the skin term is read again there. The trace is a case of the second simulator (scripts/sim2, finite
 * differences of the telegrapher's equations with the line's loss), drawn from a fixed seed: 111 m of 50 Ω coax
 * with two series faults and a shorted end; its loss, 2.334 dB/100 m at 10 MHz through the fitted model, is the
 * simulator's figure for it. Tolerance max(0.5 m, 1 %) as the simulator's scorer (scripts/sim2/score.ts); a short
 * reflects ρ = −1 and a series resistance a rise (common practice).
 */

const tolM = (d: number) => Math.max(0.5, 0.01 * d);
const at10 = (a: { lossDbPer100m?: Array<{ frequencyHz: number; dbPer100m: number }> }) =>
  a.lossDbPer100m?.find((p) => p.frequencyHz === 1e7)?.dbPer100m ?? Number.NaN;

describe('the loss of a pulse record read with the earlier echoes taken out', () => {
  it('two series faults and a short on 111 m of coax, no loss given: all three within tolerance', () => {
    const c = drawCase(0xd8360474, 33, 'unit');
    expect(c.mode).toBe('pulse');
    const req = c.expected.filter((e) => e.required);
    expect(req.map((e) => e.distanceM)).toEqual([expect.closeTo(33.01, 1), expect.closeTo(70.35, 1), expect.closeTo(111.02, 1)]);
    const a = analyzeCsv(c.csv, c.parseOptions ?? {}, { vf: c.vf, z0Ohm: c.z0Ohm });
    expect(a.lossSource).toBe('estimated');
    // Read with the earlier echoes' tails in the window: 3.801 dB/100 m, and the faults at 32.32 m and 69.51 m.
    expect(at10(a)).toBeGreaterThan(2);
    expect(at10(a)).toBeLessThan(3.2);
    for (const e of req) {
      const near = a.events.reduce((p, q) => (Math.abs(q.distanceM - e.distanceM) < Math.abs(p.distanceM - e.distanceM) ? q : p));
      expect(Math.abs(near.distanceM - e.distanceM)).toBeLessThanOrEqual(tolM(e.distanceM));
    }
    expect(a.events.filter((e) => e.type === 'impedance-rise')).toHaveLength(2);
    expect(a.events[a.events.length - 1].type).toBe('short');
  });
});
