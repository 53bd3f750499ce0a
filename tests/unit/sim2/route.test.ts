import { describe, expect, it } from 'vitest';
import type { Cable } from '../../../scripts/sim2/cables';
import { C0, edge, simulatePort } from '../../../scripts/sim2/fdtd';
import { echoList } from '../../../scripts/sim2/cases';
import { buildPhysical, lattice, type Route, toFdtd } from '../../../scripts/sim2/route';

const coax: Cable = {
  kind: 'coax-50',
  name: 'lossless 50 Ω',
  z0Ohm: 50,
  vf: 0.66,
  rdcOhmPerM: 0,
  skinOhmPerMRootHz: 0,
  tanDelta: 0,
};

/** Port step response of a route from the solver, normalised to the launched level V+. */
function solve(route: Route, sourceOhm: number, untilS: number) {
  const dt = 80e-12;
  const rise = 0.6e-9;
  const tL = 2.4e-9;
  const phys = buildPhysical(route);
  const v = simulatePort(toFdtd(phys, dt, untilS + 2 * tL), {
    dtS: dt,
    steps: Math.round((untilS + 2 * tL) / dt),
    sourceOhm,
    source: (t) => 2 * edge(t - tL, rise),
    omegaMin: (2 * Math.PI) / untilS,
  });
  const vPlus = (2 * 50) / (50 + sourceOhm);
  return { phys, at: (t: number) => v[Math.round((t + tL) / dt)] / vPlus };
}

describe('cable routes: solver against the lossless lattice', () => {
  const route: Route = {
    cable: coax,
    lengthM: 15,
    end: { kind: 'open' },
    features: [
      { kind: 'series', atM: 4, rOhm: 25 },
      { kind: 'shunt', atM: 9, rOhm: 50 },
    ],
  };

  it('lists the features with ρ = (ZL − Z0)/(ZL + Z0) and their distances', () => {
    // D. M. Pozar, Microwave Engineering, 4th ed., §2.3: a series 25 Ω sees ZL = 75 Ω → ρ = 0.2;
    // a shunt 50 Ω sees ZL = 25 Ω → ρ = −1/3; an open end ρ = +1.
    const p = buildPhysical(route);
    expect(p.events.map((e) => [e.type, e.rho, e.distanceM])).toEqual([
      ['impedance-rise', 0.2, expect.closeTo(4, 9)],
      ['impedance-drop', -1 / 3, expect.closeTo(9, 9)],
      ['open', 1, expect.closeTo(15, 9)],
    ]);
  });

  it('sees each feature through the ones before it: round-trip transmission (1 − |ρ|)² past a lumped fault', () => {
    // Series: τ = 1 − ρ each way; shunt: τ = 1 + ρ each way (Pozar §2.3 with the load in series or
    // parallel); so the shunt shows −1/3·0.8² = −0.21333 and the open end
    // 1·0.8²·(2/3)² = 0.28444.
    const p = buildPhysical(route);
    const first = lattice(p, 50, 1e-6).filter((a) => a.reflections === 1);
    expect(first.map((a) => a.amplitude)).toEqual([
      expect.closeTo(0.2, 12),
      expect.closeTo(-0.21333333, 6),
      expect.closeTo(0.28444444, 6),
    ]);
  });

  it('gives the solver the same levels as the lattice, multiples included, with a mismatched source', () => {
    const rs = 35;
    const T = (2 * 15) / (0.66 * C0);
    const { phys, at } = solve(route, rs, 2.6 * T);
    const arrivals = lattice(phys, rs, 2.6 * T, 1e-6);
    // Level just before each arrival (and at the end) = 1·(1 + ρs)⁰ launch + all earlier arrivals.
    const times = [...new Set(arrivals.map((a) => a.timeS))].sort((a, b) => a - b);
    let checked = 0;
    for (let k = 0; k < times.length; k++) {
      const tMid = k + 1 < times.length ? (times[k] + times[k + 1]) / 2 : times[k] + 1e-9;
      if (k + 1 < times.length && times[k + 1] - times[k] < 3e-9) continue; // edges overlap
      const level = 1 + arrivals.filter((a) => a.timeS <= times[k]).reduce((s, a) => s + a.amplitude, 0);
      expect(at(tMid)).toBeCloseTo(level, 3);
      checked++;
    }
    expect(checked).toBeGreaterThan(5);
  });

  it('shows a bridged tap as a junction at −1/3 and the stub end at +4/9', () => {
    // Three equal lines meet: the incident line sees Z0/2, ρ = −1/3 (Pozar §2.3), and each other
    // line carries 1 + ρ = 2/3 of it; the stub's open end comes back through the junction at (2/3)².
    const tap: Route = { cable: coax, lengthM: 30, end: { kind: 'matched' }, features: [{ kind: 'tap', atM: 6, lengthM: 5 }] };
    const p = buildPhysical(tap);
    expect(p.events.map((e) => [e.what.split(' (')[0], e.distanceM])).toEqual([
      ['bridged tap junction', expect.closeTo(6, 9)],
      ['bridged tap end', expect.closeTo(11, 9)],
      ['cable end', expect.closeTo(30, 9)],
    ]);
    // The matched end is listed with ρ 0 on a lossless line, so a reading of it is not taken as false.
    expect(p.events[2].rho).toBe(0);
    const T = (2 * 11) / (0.66 * C0);
    const { at } = solve(tap, 50, 1.3 * T);
    expect(at(0.5 * T)).toBeCloseTo(1, 3);
    expect(at(((2 * 6) / (0.66 * C0) + T) / 2)).toBeCloseTo(2 / 3, 3);
    expect(at(1.15 * T)).toBeCloseTo(2 / 3 + 4 / 9, 3);
  });

  it('places a wet section end further out by its slower velocity', () => {
    // Apparent distance = delay × nominal VF × c: 10 m at 0.8 × the VF read as 12.5 m.
    const wet: Route = {
      cable: coax,
      lengthM: 40,
      end: { kind: 'open' },
      features: [{ kind: 'wet', atM: 12, lengthM: 10, zScale: 0.8, vfScale: 0.8, gSPerM: 0 }],
    };
    const p = buildPhysical(wet);
    expect(p.events.map((e) => e.distanceM)).toEqual([12, expect.closeTo(24.5, 9), expect.closeTo(42.5, 9)]);
    expect(p.events[0].rho).toBeCloseTo(-1 / 9, 12); // (40 − 50)/(40 + 50)
  });
});

describe('multiples through a bridged tap', () => {
  it('come home after two bounces, and the case lists them as multiples', () => {
    // 20 m of line shorted at its end, a 4 m open stub of the same line at 6 m. A junction of three equal
    // lines passes 2/3 of a wave into each other line and sends back −1/3 (Pozar §2.3 with two lines in
    // parallel as the load). Far end, then stub: 2/3 · (−1) · 2/3 · (+1) · 2/3 = −8/27, and the same
    // the other way round (stub first): −16/27 in all, at 20 + 4 = 24 m apparent.
    const route: Route = { cable: coax, lengthM: 20, end: { kind: 'short' }, features: [{ kind: 'tap', atM: 6, lengthM: 4 }] };
    const arrivals = lattice(buildPhysical(route), 50, 1e-6, 1e-6);
    const v = coax.vf * C0;
    const twice = arrivals.filter((a) => a.reflections === 2 && Math.abs((a.timeS * v) / 2 - 24) < 1e-6);
    expect(twice).toHaveLength(2);
    expect(twice.reduce((s, a) => s + a.amplitude, 0)).toBeCloseTo(-16 / 27, 9);
    const echoes = echoList(arrivals, coax.vf);
    const at24 = echoes.find((e) => Math.abs(e.distanceM - 24) < 0.01);
    expect(at24?.rho).toBeCloseTo(-16 / 27, 9);
    // First-order arrivals are events, never multiples.
    for (const e of echoes) expect(e.distanceM).not.toBeCloseTo(20, 1);
  });
});
