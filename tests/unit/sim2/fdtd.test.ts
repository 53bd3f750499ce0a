import { describe, expect, it } from 'vitest';
import { C0, type CableRlgc, edge, erfc, type FdtdNetwork, simulatePort } from '../../../scripts/sim2/fdtd';
import { fitSkin, skinImpedance, skinImpedanceExact } from '../../../scripts/sim2/fit';

const lossless50: CableRlgc = { z0Ohm: 50, vf: 0.66, rdcOhmPerM: 0, skinOhmPerMRootHz: 0, tanDelta: 0 };

function line(cable: CableRlgc, lengthM: number, end: 'open' | number): FdtdNetwork {
  return {
    nodeCount: 2,
    lines: [{ a: 0, b: 1, lengthM, cable }],
    shunts: end === 'open' ? [] : [{ node: 1, rOhm: end }],
    series: [],
    caps: [],
    inductors: [],
  };
}

/** Port voltage for a step source of 2 V open-circuit with its 50 % point at tLaunch. */
function stepRun(net: FdtdNetwork, o: { dt: number; until: number; rs: number; rise: number; tLaunch: number }) {
  const v = simulatePort(net, {
    dtS: o.dt,
    steps: Math.round(o.until / o.dt),
    sourceOhm: o.rs,
    source: (t) => 2 * edge(t - o.tLaunch, o.rise),
    omegaMin: (2 * Math.PI) / o.until,
  });
  const at = (t: number) => {
    const x = t / o.dt;
    const i = Math.floor(x);
    return v[i] + (v[i + 1] - v[i]) * (x - i);
  };
  /** First time after `from` the trace crosses `level`, linearly interpolated. */
  const crossing = (level: number, from: number) => {
    for (let i = Math.ceil(from / o.dt) + 1; i < v.length; i++) {
      if ((v[i - 1] - level) * (v[i] - level) <= 0 && v[i] !== v[i - 1])
        return (i - 1 + (level - v[i - 1]) / (v[i] - v[i - 1])) * o.dt;
    }
    return NaN;
  };
  return { v, at, crossing };
}

describe('FDTD line simulator against closed forms', () => {
  const L = 5;
  const T = (2 * L) / (0.66 * C0); // round trip, 2L/(VF·c)
  const o = { dt: 50e-12, until: 3.2 * T, rs: 50, rise: 0.4e-9, tLaunch: 1e-9 };

  it('returns an open end after the round trip 2L/(VF·c) on a lossless line', () => {
    // d = VF·c·t/2 (common practice; D. M. Pozar, Microwave Engineering, 4th ed., §2.1: v = 1/√(LC)).
    const r = stepRun(line(lossless50, L, 'open'), o);
    const launch50 = r.crossing(0.5, 0);
    const echo50 = r.crossing(1.5, launch50 + T / 2);
    expect(Math.abs(launch50 - o.tLaunch)).toBeLessThan(o.dt / 2);
    // 50.54 ns, to within half a time step (25 ps).
    expect(Math.abs(echo50 - launch50 - T)).toBeLessThan(o.dt / 2);
  });

  it.each([
    ['open', 'open' as const, 1],
    ['short', 0, -1],
    ['100 Ω on 50 Ω', 100, 1 / 3],
    ['25 Ω on 50 Ω', 25, -1 / 3],
  ])('gives ρ = (ZL − Z0)/(ZL + Z0) for a %s load', (_name, end, rho) => {
    // Γ = (ZL − Z0)/(ZL + Z0): D. M. Pozar, Microwave Engineering, 4th ed., §2.3.
    const r = stepRun(line(lossless50, L, end), o);
    const vPlus = r.at(o.tLaunch + T / 2);
    expect(vPlus).toBeCloseTo(1, 6); // Vs·Z0/(Rs + Z0) = 2·50/100
    expect((r.at(o.tLaunch + 1.5 * T) - vPlus) / vPlus).toBeCloseTo(rho, 4);
  });

  it('re-reflects at a mismatched source at the bounce-diagram times and sizes', () => {
    // Lattice (bounce) diagram of a lossless line, e.g. C. R. Paul, Analysis of Multiconductor
    // Transmission Lines, 2nd ed. (two-conductor line transients): Rs = 25 Ω on Z0 = 50 Ω, so
    // ρs = −1/3; open end ρ = +1; Vs = 2 V. Port levels: V+ = 2·50/75 = 4/3 V; after the first
    // echo V+·(1 + ρ(1 + ρs)) = 4/3 · 5/3 = 20/9 V; after the re-reflection, + V+·ρ²·ρs·(1 + ρs)
    // = −8/27 V, so 52/27 V.
    const r = stepRun(line(lossless50, L, 'open'), { ...o, rs: 25 });
    expect(r.at(o.tLaunch + 0.5 * T)).toBeCloseTo(4 / 3, 5);
    expect(r.at(o.tLaunch + 1.5 * T)).toBeCloseTo(20 / 9, 5);
    expect(r.at(o.tLaunch + 2.5 * T)).toBeCloseTo(52 / 27, 5);
    const second = r.crossing((20 / 9 + 52 / 27) / 2, o.tLaunch + 1.5 * T);
    // Within one time step (50 ps).
    expect(Math.abs(second - o.tLaunch - 2 * T)).toBeLessThan(o.dt);
  });

  it('settles a lossy line to the DC divider value', () => {
    // Ohm's law (common practice): at DC the line is its loop resistance, so the port reads
    // Vs·(R·ℓ + RL)/(Rs + R·ℓ + RL) = 2·(5 + 100)/(50 + 5 + 100) = 1.35484 V.
    const lossy: CableRlgc = { z0Ohm: 50, vf: 0.66, rdcOhmPerM: 1, skinOhmPerMRootHz: 2e-4, tanDelta: 2e-3 };
    const r = stepRun(line(lossy, L, 100), { ...o, dt: 100e-12, until: 60 * T });
    expect(r.at(59 * T)).toBeCloseTo(2 * (105 / 155), 3);
  });

  it('spreads a skin-effect echo as erfc(a / 2√t)', () => {
    // R. L. Wigington and N. S. Nahman, "Transient analysis of coaxial cables considering skin
    // effect", Proc. IRE 45 (1957) 166: with series impedance sL + K√s the step response after a
    // path x is erfc(a / (2√(t − x/v))), a = K·x/(2·Z0), K = Rs/√π when R(f) = Rs·√f. The
    // simulator's edge is Gaussian, so the closed form is convolved with it here.
    const rs = 2.4e-4;
    const len = 26;
    const cable: CableRlgc = { z0Ohm: 50, vf: 0.66, rdcOhmPerM: 0, skinOhmPerMRootHz: rs, tanDelta: 0 };
    const Tl = (2 * len) / (0.66 * C0);
    const run = { dt: 0.2e-9, until: Tl + 60e-9, rs: 50, rise: 2e-9, tLaunch: 5e-9 };
    const r = stepRun(line(cable, len, 'open'), run);
    const a = ((rs / Math.sqrt(Math.PI)) * 2 * len) / (2 * 50);
    const sigma = run.rise / 2.5631;
    const model = (t: number) => {
      // ∫ erfc(a/2√(t − τ)) · N(τ; 0, σ) dτ by the midpoint rule.
      let acc = 0;
      let w = 0;
      for (let k = -400; k <= 400; k++) {
        const tau = (k / 100) * sigma;
        const g = Math.exp(-0.5 * (tau / sigma) ** 2);
        const dtau = t - tau;
        acc += g * (dtau > 0 ? erfc(a / (2 * Math.sqrt(dtau))) : 0);
        w += g;
      }
      return acc / w;
    };
    const before = r.at(run.tLaunch + Tl - 4 * sigma);
    let worst = 0;
    for (let t = -3e-9; t <= 50e-9; t += 0.5e-9) {
      const got = r.at(run.tLaunch + Tl + t) - before;
      worst = Math.max(worst, Math.abs(got - model(t)));
    }
    // The echo height is V+ = 1 V; the skin spread reaches half height about 1.13·a² = 5.6 ns late.
    expect(a * a * 1e9).toBeCloseTo(4.96, 1);
    // The closed form leaves out how the skin effect also raises the line's impedance at lower
    // frequencies (by K/(2L√s), about 4 % over this record), which shifts the port level by a few
    // per cent of the echo; hence 3 %.
    expect(worst).toBeLessThan(0.03);
  });

  it('fits the skin impedance Rdc·√(1 + jω/a) within 2 % across the band', () => {
    // Target: surface impedance of a good conductor, Rs·√f·(1 + j) at high frequency (S. Ramo,
    // J. R. Whinnery, T. Van Duzer, Fields and Waves in Communication Electronics, 3rd ed., §5.6).
    const fit = fitSkin(0.18, 4e-4, 2e10, 1e5);
    for (let lf = 4; lf <= 9; lf += 0.25) {
      const w = 2 * Math.PI * 10 ** lf;
      const [re, im] = skinImpedance(fit, w);
      const [er, ei] = skinImpedanceExact(0.18, 4e-4, w);
      expect(Math.hypot(re - er, im - ei) / Math.hypot(er, ei)).toBeLessThan(0.02);
    }
    // Far above the DC region R(f) → Rs·√f: 4e-4·√(1e9) = 12.65 Ω/m.
    expect(skinImpedanceExact(0.18, 4e-4, 2 * Math.PI * 1e9)[0]).toBeCloseTo(12.65, 1);
  });
});
