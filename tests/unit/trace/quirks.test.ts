import { describe, expect, it } from 'vitest';
import { analyzeCsv, analyzeTrace, parseTraceCsv, TraceInputError, type ParsedTrace } from '../../../shared/trace';
import { traceAnalysisSchema } from '../../../shared/schemas/trace-analysis';
import { COAX_50, POWER_MV } from '../../../scripts/sim/cables';
import { impair, simulate } from '../../../scripts/sim/line-model';
import { writeLayout } from '../../../scripts/sim/layouts';
import { defaultAcquisition, simulateScenario, type Scenario } from '../../../scripts/sim/scenario';
import { parsedTrace } from '../../support/parsed-trace';

// Ground truth is the simulated geometry: a 50 Ω coax with a 100 Ω shunt fault at
// 23.5 m (ρ = (ZL − Z0)/(ZL + Z0) with ZL = 100 ∥ 50 = 33.3 Ω gives −0.2) and an open end at 60 m.
const route: Scenario = {
  name: 'quirks',
  cable: COAX_50,
  lengthM: 60,
  end: 'open',
  features: [{ kind: 'shunt', atM: 23.5, rOhm: 100 }],
};
const tol = (d: number) => Math.max(0.5, 0.01 * d);

function traceOf(t: Float64Array, v: Float64Array, unit: 'V' | 'rho' = 'V'): ParsedTrace {
  return parsedTrace(v, { timeS: t, unit });
}

function expectRoute(events: Array<{ distanceM: number; type: string }>, offsetM = 0) {
  const primary = events.filter(
    (e) => !('likelyMultipleOf' in e) || (e as { likelyMultipleOf: number | null }).likelyMultipleOf === null,
  );
  expect(primary.map((e) => e.type)).toEqual(['impedance-drop', 'open']);
  expect(Math.abs(primary[0].distanceM - (23.5 - offsetM))).toBeLessThanOrEqual(tol(23.5));
  expect(Math.abs(primary[1].distanceM - (60 - offsetM))).toBeLessThanOrEqual(tol(60));
}

describe('trace quirks', () => {
  const acq = defaultAcquisition(route, 'step', 11, 0.002, 12);
  const sim = simulateScenario(route, acq);

  it('finds the route in a clean step trace, with a schema-valid result', () => {
    const a = analyzeTrace(traceOf(sim.timeS, sim.volts), { vf: COAX_50.vf, z0Ohm: 50 });
    expect(traceAnalysisSchema.parse(a)).toBeTruthy();
    expectRoute(a.events);
    expect(a.events[0].reflectionCoefficient).toBeCloseTo(-0.2, 1);
    // 100 Ω ∥ 50 Ω = 33.3 Ω; cable loss softens the step a little.
    expect(a.events[0].impedanceOhm).toBeGreaterThan(30);
    expect(a.events[0].impedanceOhm).toBeLessThan(40);
    expect(a.events[1].isCableEnd).toBe(true);
    for (const e of a.events) expect(e.windowStartM).toBeLessThan(e.distanceM);
  });

  it('ignores a baseline offset and a slow DC drift', () => {
    const v = sim.volts.map((x, i) => x + 0.15 + (0.02 * i) / sim.volts.length);
    expectRoute(analyzeTrace(traceOf(sim.timeS, v), { vf: COAX_50.vf }).events);
  });

  it('finds the launch after a long pre-trigger record', () => {
    const a2 = { ...acq, preTriggerSamples: 1500, samples: acq.samples + 1400, timeOfFirstSampleS: -1500 * acq.sampleIntervalS };
    const s2 = simulateScenario(route, a2);
    expectRoute(analyzeTrace(traceOf(s2.timeS, s2.volts), { vf: COAX_50.vf }).events);
  });

  it('reads an inverted (negative-going) launch', () => {
    const v = sim.volts.map((x) => -x);
    expectRoute(analyzeTrace(traceOf(sim.timeS, v), { vf: COAX_50.vf }).events);
  });

  it('reads ρ units with the launch in the record (−1 before it)', () => {
    const rho = sim.volts.map((x) => x / sim.incidentV - 1);
    expectRoute(analyzeTrace(traceOf(sim.timeS, rho, 'rho'), { vf: COAX_50.vf }).events);
  });

  it('reads a reflection-only ρ trace whose time zero is the reference plane', () => {
    const s3 = simulateScenario(route, {
      ...acq,
      output: 'reflection',
      timeOfFirstSampleS: -acq.preTriggerSamples * acq.sampleIntervalS,
    });
    const rho = s3.volts.map((x) => x / s3.incidentV);
    const a = analyzeTrace(traceOf(s3.timeS, rho, 'rho'), { vf: COAX_50.vf });
    expect(a.launch.foundInTrace).toBe(false);
    expectRoute(a.events);
  });

  it('reads a record that starts at the incident level', () => {
    const from = acq.preTriggerSamples + 20;
    const t = sim.timeS.slice(from).map((x) => x - sim.timeS[acq.preTriggerSamples]);
    const a = analyzeTrace(traceOf(t, sim.volts.slice(from)), { vf: COAX_50.vf });
    expect(a.launch.foundInTrace).toBe(false);
    expectRoute(a.events);
  });

  it('subtracts a test lead and honours a manual zero', () => {
    expectRoute(analyzeTrace(traceOf(sim.timeS, sim.volts), { vf: COAX_50.vf, leadLengthM: 2 }).events, 2);
    // Zero moved 10 ns later: every distance is VF·c·10 ns/2 = 0.989 m shorter.
    const a = analyzeTrace(traceOf(sim.timeS, sim.volts), { vf: COAX_50.vf, zeroOffsetNs: 10 });
    expectRoute(a.events, (0.66 * 299_792_458 * 10e-9) / 2);
  });

  it('widens the window with the VF tolerance', () => {
    const narrow = analyzeTrace(traceOf(sim.timeS, sim.volts), { vf: COAX_50.vf, vfTolerance: 0.01 });
    const wide = analyzeTrace(traceOf(sim.timeS, sim.volts), { vf: COAX_50.vf, vfTolerance: 0.05 });
    expect(wide.events[1].uncertaintyM).toBeGreaterThan(narrow.events[1].uncertaintyM);
    expect(wide.events[1].uncertaintyM).toBeGreaterThanOrEqual(0.05 * 60 * 0.98);
  });

  it('honours a mode override and detects pulse traces', () => {
    const p = simulateScenario(route, defaultAcquisition(route, 'pulse', 12, 0.002, 12));
    const auto = analyzeTrace(traceOf(p.timeS, p.volts), { vf: COAX_50.vf });
    expect(auto.mode).toBe('pulse');
    expect(auto.modeDetected).toBe(true);
    expectRoute(auto.events);
    const forced = analyzeTrace(traceOf(sim.timeS, sim.volts), { vf: COAX_50.vf, mode: 'step' });
    expect(forced.modeDetected).toBe(false);
    expectRoute(forced.events);
  });

  it('reports nothing on a matched, fault-free cable', () => {
    for (const mode of ['step', 'pulse'] as const) {
      const matched: Scenario = { name: 'matched', cable: POWER_MV, lengthM: 800, end: 'matched', features: [] };
      const m = simulateScenario(matched, defaultAcquisition(matched, mode, 21, 0.004, 10));
      const a = analyzeTrace(traceOf(m.timeS, m.volts), { vf: POWER_MV.vf });
      expect(a.events).toEqual([]);
      expect(a.warnings.map((w) => w.code)).toContain('NO_REFLECTION');
    }
  });

  it('flags the echo of an open end from a mismatched source at twice its time', () => {
    // A 25 Ω source on a 50 Ω line reflects ρs = −1/3, so the open's step returns at 2t.
    const dt = 0.1e-9;
    const clean = simulate(
      {
        elements: [{ kind: 'line', lengthM: 15, cable: { ...COAX_50, rdcOhmPerM: 0.01, skinOhmPerMRootHz: 2e-5 } }],
        termination: { kind: 'open' },
      },
      {
        samples: 3600,
        sampleIntervalS: dt,
        launchAtS: 100 * dt,
        riseTimeS: 0.5e-9,
        sourceV: 2,
        sourceOhm: 25,
        excitation: { kind: 'step' },
      },
    );
    const v = impair(clean, { noiseV: 0.001, adcBits: 12, fullScaleV: 2.5, seed: 5 });
    const t = new Float64Array(v.length).map((_, i) => i * dt);
    const a = analyzeTrace(traceOf(t, v), { vf: COAX_50.vf });
    expect(a.events[0].type).toBe('open');
    expect(Math.abs(a.events[0].distanceM - 15)).toBeLessThanOrEqual(0.5);
    const echo = a.events.find((e) => Math.abs(e.distanceM - 30) < 1);
    expect(echo?.likelyMultipleOf).toBe(0);
  });

  it('gives the same answer from every CSV layout', () => {
    const layouts = [
      'time-ns-mv',
      'time-s-v-comments',
      'time-us-semicolon-decimal-comma',
      'time-ps-rho',
      'amplitude-only',
      'distance-m-preamble',
      'distance-ft-tab',
      'time-ms-units-row',
    ] as const;
    for (const layout of layouts) {
      const csv = writeLayout({
        layout,
        timeS: sim.timeS,
        volts: sim.volts,
        incidentV: sim.incidentV,
        instrumentVf: 0.7,
        cableName: 'coax',
      });
      expectRoute(analyzeCsv(csv, {}, { vf: COAX_50.vf }).events);
    }
  });

  it('reads an ideal lossless bounce-diagram trace with one-sample edges', () => {
    // Lattice model: reflections ρ = −0.3, +0.2 and +1 at 400, 1500 and 2400 samples after the
    // launch, each arrival scaled by the round-trip transmission (1 − ρ²) of those before it.
    const dt = 1e-9;
    const vf = 0.7;
    const mPerSample = (vf * 299_792_458 * dt) / 2;
    const events: Array<[number, number]> = [
      [400, -0.3],
      [1500, 0.2],
      [2400, 1],
    ];
    for (const mode of ['step', 'pulse'] as const) {
      for (const noise of [0, 0.01]) {
        let seed = 7;
        const rnd = () => ((seed = (seed * 16807) % 2147483647) / 2147483647 - 0.5) * noise;
        const t = new Float64Array(3000).map((_, i) => (i - 50) * dt);
        const v = t.map((_, i) => {
          const shape = (k: number) => (mode === 'step' ? (i >= k ? 1 : 0) : i >= k && i < k + 4 ? 1 : 0);
          let x = shape(50);
          let T = 1;
          for (const [k, rho] of events) {
            x += T * rho * shape(50 + k);
            T *= 1 - rho * rho;
          }
          return x + rnd();
        });
        const a = analyzeTrace(traceOf(t, v), { vf });
        expect(a.mode).toBe(mode);
        expect(a.events.map((e) => e.type)).toEqual(['impedance-drop', 'impedance-rise', 'open']);
        a.events.forEach((e, k) => expect(Math.abs(e.distanceM - events[k][0] * mPerSample)).toBeLessThanOrEqual(mPerSample));
        expect(a.events[0].reflectionCoefficient).toBeCloseTo(-0.3, 2);
        expect(a.events[1].reflectionCoefficient).toBeCloseTo(0.2 * 0.91, 1);
      }
    }
  });

  it('rejects impossible options', () => {
    const tr = parseTraceCsv(
      writeLayout({ layout: 'time-ns-mv', timeS: sim.timeS, volts: sim.volts, incidentV: 1, instrumentVf: 0.66, cableName: 'c' }),
    );
    for (const bad of [
      { vf: 1.5 },
      { vf: 0 },
      { vf: 0.66, vfTolerance: -1 },
      { vf: 0.66, z0Ohm: -50 },
      { vf: 0.66, leadLengthM: -1 },
    ]) {
      expect(() => analyzeTrace(tr, bad)).toThrow(TraceInputError);
    }
  });
});
