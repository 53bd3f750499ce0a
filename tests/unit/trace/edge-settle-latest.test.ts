import { describe, expect, it } from 'vitest';
import { analyzeCsv } from '../../../shared/trace';
import { latestOnset } from '../../../shared/trace/edge-fit';
import { drawCase } from '../../../scripts/sim2/cases';

/**
 * Widening the level window after an edge may not move its onset later than the detection allows: the
 * step filter's peak places the edge to about w/snr (its slope beside the peak is height/w) plus half the
 * w/4 stride it is read on, and the onset lies at or before the edge's middle.
 */

const tolM = (d: number) => Math.max(0.5, 0.01 * d);

describe('latest onset the level widening may reach', () => {
  it('is half a stride plus three timing uncertainties w/snr after the detection', () => {
    // w 162: stride 40, half of it 20; 3 · 162 / 13.6 = 35.735.
    expect(latestOnset({ i: 5844, w: 162, snr: 13.6 })).toBeCloseTo(5899.735, 3);
    // A clear edge is held close to its detection: 3 · 40 / 120 = 1.
    expect(latestOnset({ i: 1000, w: 40, snr: 120 })).toBeCloseTo(1000 + 5 + 1, 6);
    // At the detection threshold (about 3.4 σ) the bound is about one window (25 / 2 + 300 / 3.4).
    expect(latestOnset({ i: 0, w: 100, snr: 3.4 })).toBeCloseTo(12.5 + 88.235, 3);
  });

  it('an open on 56 m of power cable, noisy step record without the loss known: read within tolerance, not late', () => {
    // A case of the second simulator (scripts/sim2), drawn from a fixed seed. The widening's second
    // window put the open's onset on a noise excursion 200 samples after the detection (a rise of 2 samples
    // where the first reading had 118), and the line fit then read the open 0.57 m late (56.63 m).
    const c = drawCase(0x2f25cca7, 61, 'unit');
    expect(c.mode).toBe('step');
    const open = c.expected.find((e) => e.required)!;
    expect(open.type).toBe('open');
    expect(open.distanceM).toBeCloseTo(56.06, 1);
    const a = analyzeCsv(c.csv, c.parseOptions ?? {}, { vf: c.vf, z0Ohm: c.z0Ohm });
    const opens = a.events.filter((e) => e.type === 'open');
    expect(opens).toHaveLength(1);
    expect(Math.abs(opens[0].distanceM - open.distanceM)).toBeLessThanOrEqual(tolM(open.distanceM));
  });
});
