import { describe, expect, it } from 'vitest';
import { PAIR_04 } from '../../../scripts/sim/cables';
import { writeLayout } from '../../../scripts/sim/layouts';
import { defaultAcquisition, simulateScenario } from '../../../scripts/sim/scenario';
import { analyzeCsv } from '../../../shared/trace';
import { estimateFromIncident, incidentStep, nelderMead } from '../../../shared/trace/loss-estimate';

const C = 299_792_458;

describe('the incident step of a long line with series loss', () => {
  // First-order expansions of ρ_in = (Zc − Z0)/(Zc + Z0) with Zc/Z0 = √(1 + 2v(r + s√f(1 + j))/(jω)):
  // a line length dx with series resistance R·dx reflects R·dx/2Z0 = r·dx, so the step reads r·v·t/2
  // while r·v·t ≪ 1; the skin term's √s impedance gives s·v·√t/π (inverse Laplace of s^(−1/2) is
  // 1/√(πt), M. Abramowitz and I. A. Stegun, Handbook of Mathematical Functions, 29.3.4).
  const vf = 0.67;
  const v = vf * C;

  it('rises as r·v·t/2 from the DC resistance alone', () => {
    const r = 9e-4;
    // r·v·t = 0.01 and 0.03 at 50 ns and 150 ns: the straight rise within 2 %.
    const [a, b] = incidentStep(r, 0, vf, [50e-9, 150e-9]);
    expect(a / ((r * v * 50e-9) / 2) - 1).toBeLessThan(0.02);
    expect(a / ((r * v * 50e-9) / 2) - 1).toBeGreaterThan(-0.02);
    expect(b / ((r * v * 150e-9) / 2) - 1).toBeGreaterThan(-0.04);
    expect(b / ((r * v * 150e-9) / 2) - 1).toBeLessThan(0.01);
  });

  it('rises as s·v·√t/π from the skin effect alone', () => {
    const s = 1.5e-7;
    for (const t of [20e-9, 200e-9]) {
      const got = incidentStep(0, s, vf, [t])[0];
      const expected = (s * v * Math.sqrt(t)) / Math.PI;
      expect(Math.abs(got / expected - 1)).toBeLessThan(0.03);
    }
  });

  it('stays at zero on a lossless line', () => {
    expect(incidentStep(0, 0, vf, [1e-8, 1e-6]).every((x) => Math.abs(x) < 1e-12)).toBe(true);
  });
});

describe('loss estimated from the incident step', () => {
  /** A step record: launch at sample 50, 2 ns per sample, the line's incident response on it, and a level offset. */
  function record(r: number, s: number, sigma: number) {
    const n = 1600;
    const dt = 2e-9;
    const ts = Array.from({ length: n }, (_, i) => Math.max(0, (i - 50) * dt));
    const rho = incidentStep(r, s, 0.67, ts);
    let seed = 7;
    const rnd = () => {
      // Park–Miller minimal standard generator (S. K. Park and K. W. Miller, CACM 31 (1988) 1192), as a sum of 4 for a bell shape.
      let acc = 0;
      for (let k = 0; k < 4; k++) {
        seed = (seed * 16807) % 2147483647;
        acc += seed / 2147483647 - 0.5;
      }
      return acc * Math.sqrt(3);
    };
    const y = Float64Array.from(rho, (x, i) => (i >= 50 ? x - 0.02 + sigma * rnd() : 0));
    return { y, dt };
  }

  it('recovers the DC and skin terms of a 0.5 mm telecom pair (0.18 Ω/m loop, 100 Ω: r = R/2Z0 = 9e-4 Np/m) within 10 %', () => {
    const r = 9e-4;
    const s = 1.5e-6;
    const { y, dt } = record(r, s, 0.002);
    const est = estimateFromIncident({ y, dt, t0Idx: 50, from: 70, to: 1550, vf: 0.67 });
    expect(est).not.toBeNull();
    expect(Math.abs(est!.model.resistiveNpPerM! / r - 1)).toBeLessThan(0.1);
    expect(Math.abs(est!.model.skinNpPerMRootHz / s - 1)).toBeLessThan(0.1);
    expect(est!.ssFit).toBeLessThan(est!.ssFlat / 100);
  });

  it('finds no loss worth the name on a flat record', () => {
    const { y, dt } = record(0, 0, 0.002);
    const est = estimateFromIncident({ y, dt, t0Idx: 50, from: 70, to: 1550, vf: 0.67 });
    expect(est).not.toBeNull();
    // The fitted loss explains no more than noise: well under a tenth of the pair's.
    expect(est!.ssFlat - est!.ssFit).toBeLessThan(25 * (est!.ssFit / (est!.points - 3)));
  });

  it('refuses a stretch too short to fit', () => {
    const { y, dt } = record(9e-4, 1.5e-6, 0);
    expect(estimateFromIncident({ y, dt, t0Idx: 50, from: 70, to: 80, vf: 0.67 })).toBeNull();
  });
});

describe('the simplex search', () => {
  it('finds the minimum of the Rosenbrock valley at (1, 1) (H. H. Rosenbrock, Computer Journal 3 (1960) 175)', () => {
    const f = (p: number[]) => 100 * (p[1] - p[0] ** 2) ** 2 + (1 - p[0]) ** 2;
    const m = nelderMead(f, [-1.2, 1], 0.5, 2000);
    expect(m.x[0]).toBeCloseTo(1, 2);
    expect(m.x[1]).toBeCloseTo(1, 2);
  });
});

describe('an analysis of a lossy pair with no loss in the library', () => {
  // A 0.4 mm telecom pair (0.27 Ω/m loop, 120 Ω: r = 0.27/240 = 1.1e-3 Np/m, so the far end's step comes
  // back at about exp(−2 · 400 · 1.1e-3) = 0.41 of its height) 400 m long, ending in a short (ρ = −1,
  // common practice), simulated by scripts/sim with the line's exact RLGC propagation.
  const scenario = { name: 'pair-04-400m-short', cable: PAIR_04, lengthM: 400, end: 'short' as const, features: [] };

  it('reads the loss from the incident step and the edge, and the short as a short at its place', () => {
    const sim = simulateScenario(scenario, defaultAcquisition(scenario, 'step', 4242, 0.002, 12));
    const csv = writeLayout({ layout: 'time-ns-mv', timeS: sim.timeS, volts: sim.volts, incidentV: sim.incidentV, instrumentVf: PAIR_04.vf, cableName: PAIR_04.name });
    const a = analyzeCsv(csv, {}, { vf: PAIR_04.vf, z0Ohm: PAIR_04.z0Ohm });
    expect(a.lossSource).toBe('estimated');
    expect(a.lossEstimatedFrom).toContain('incident-step');
    const end = a.events.find((e) => Math.abs(e.distanceM - 400) < 8);
    expect(end).toBeDefined();
    // Distance within 1 % (scripts/sim/sweep.ts tolerance), ρ within ±(0.05 + 20 %) of −1.
    expect(Math.abs(end!.distanceM - 400)).toBeLessThanOrEqual(4);
    expect(Math.abs(end!.reflectionCoefficient + 1)).toBeLessThanOrEqual(0.25);
    expect(end!.lossCorrected).toBe(true);
    expect(end!.windowStartM).toBeLessThanOrEqual(400);
    expect(end!.windowEndM).toBeGreaterThanOrEqual(400);
    // The same trace read without the loss model would put the short at about 0.4 of its ρ.
    expect(Math.abs(end!.reflectionCoefficient)).toBeGreaterThan(0.75);
  });
});
