import { describe, expect, it } from 'vitest';
import { libraryLoss } from './support/lossy-line';
import { SPEED_OF_LIGHT_M_PER_S } from '../../../shared/cable/propagation';
import { analyzeCsv } from '../../../shared/trace';
import { incidentCreep, pulseCreepRemoved } from '../../../shared/trace/creep';
import { findLaunch } from '../../../shared/trace/launch';
import { estimateSlowNoise } from '../../../shared/trace/noise';
import { exactLineKernel, lossModelThroughLine } from '../../../shared/trace/loss';
import { incidentStep } from '../../../shared/trace/loss-estimate';
import { PAIR_04 } from '../../../scripts/sim/cables';
import { simulate } from '../../../scripts/sim/line-model';
import { writeLayout } from '../../../scripts/sim/layouts';
import { buildNetwork, defaultAcquisition, type Scenario, simulateScenario } from '../../../scripts/sim/scenario';

/**
 * A step launched into a long thin pair creeps up on its own (the line's input impedance grows at
 * low frequency); with the cable's loss known the engine takes that creep out before it looks for
 * reflections. The check values are the frequency-domain simulator's own (scripts/sim): where each
 * feature was put.
 */


describe('the incident step’s creep on a lossy pair', () => {
  it('follows the exact step response on every sample, the early square-root rise included', () => {
    const model = lossModelThroughLine(libraryLoss(PAIR_04), PAIR_04.vf);
    const dt = 1e-9;
    const n = 40_000;
    const rec = { y: new Float64Array(n), t: new Float64Array(n).map((_, i) => i * dt), n, dt, unit: 'V' as const };
    const t0 = 100;
    const c = incidentCreep(model, PAIR_04.vf, rec, t0);
    expect(c[t0 - 1]).toBe(0);
    // Spot checks against the response computed on a grid made for each time alone.
    for (const i of [t0 + 20, t0 + 300, t0 + 4000, n - 1]) {
      const exact = incidentStep(model.resistiveNpPerM ?? 0, model.skinNpPerMRootHz, PAIR_04.vf, [(i - t0) * dt])[0];
      expect(c[i] / exact).toBeCloseTo(1, 1);
    }
    // It climbs: a 0.4 mm pair reads well above the matched level 20 µs after the launch.
    expect(c[n - 1]).toBeGreaterThan(0.2);
    expect(c[n - 1]).toBeGreaterThan(c[t0 + 4000]);
  });

  it('reads a series fault 400 m out on a 1 km 0.4 mm pair as a rise in impedance, within 1 %, not as the cable’s end', () => {
    const scenario: Scenario = { name: 'pair-04-1000m', cable: PAIR_04, lengthM: 1000, end: 'open', features: [{ kind: 'series', atM: 400, rOhm: 150 }] };
    const acq = defaultAcquisition(scenario, 'step', 9100, 0.002, 12);
    const sim = simulateScenario(scenario, acq);
    const csv = writeLayout({ layout: 'time-ns-mv', timeS: sim.timeS, volts: sim.volts, incidentV: sim.incidentV, instrumentVf: PAIR_04.vf, cableName: PAIR_04.name });
    const a = analyzeCsv(csv, {}, { vf: PAIR_04.vf, z0Ohm: PAIR_04.z0Ohm, loss: libraryLoss(PAIR_04) });
    const series = a.events.find((e) => Math.abs(e.distanceM - 400) <= 4); // max(0.5 m, 1 %), the product's requirement
    expect(series, JSON.stringify(a.events.map((e) => [e.distanceM, e.type]))).toBeDefined();
    expect(series!.type).toBe('impedance-rise');
    // Nothing before it is taken for the cable's end.
    expect(a.events.filter((e) => e.distanceM < 400 && e.type === 'open')).toEqual([]);
  });

  it('with an open end’s reflection as the port passes it, follows the simulator’s port voltage until the wave’s second round trip', () => {
    // A noise-free step into 1 km of 0.4 mm pair from a source of its nominal impedance, open at the far end.
    const cable = PAIR_04;
    const d = 1000;
    const scenario: Scenario = { name: 'pair-04-1000m-open', cable, lengthM: d, end: 'open', features: [] };
    const acq = defaultAcquisition(scenario, 'step', 1, 0, 16);
    const dt = acq.sampleIntervalS;
    const n = acq.samples;
    const t0 = acq.preTriggerSamples;
    const port = simulate(buildNetwork(scenario).net, { samples: n, sampleIntervalS: dt, launchAtS: t0 * dt, riseTimeS: acq.riseTimeS, sourceV: 2, sourceOhm: cable.z0Ohm, excitation: { kind: 'step' } });
    const model = lossModelThroughLine(libraryLoss(cable), cable.vf);
    const creep = incidentCreep(model, cable.vf, { y: new Float64Array(n), t: new Float64Array(n), n, dt, unit: 'V' }, t0);
    const kernel = exactLineKernel(model, 2 * d, dt, n, cable.vf);
    const reflection = new Float64Array(kernel.values.length);
    for (let i = 0, acc = 0; i < reflection.length; i++) reflection[i] = acc += kernel.values[i];
    const delay = (2 * d) / (cable.vf * SPEED_OF_LIGHT_M_PER_S) / dt;
    // From a few rise times after the lossless arrival to the second round trip (the port's re-reflection).
    let ss = 0;
    let count = 0;
    for (let i = Math.ceil(t0 + delay + 4 * acq.riseTimeS / dt); i < Math.min(n, t0 + 2 * delay); i++) {
      const x = i - t0 - delay + kernel.offset;
      const j = Math.floor(x);
      const r = reflection[j] + (x - j) * (reflection[j + 1] - reflection[j]);
      // The simulator's incident level is 1 V (2 V behind the matched source): u = V − 1.
      ss += (port[i] - 1 - creep[i] - r) ** 2;
      count++;
    }
    expect(count).toBeGreaterThan(500);
    // A thousandth of the incident step, where the reflection has risen to a fifth of it.
    expect(Math.sqrt(ss / count)).toBeLessThan(0.001);
  });
});

describe('the creep a launch pulse leaves on a lossy pair', () => {
  it('is taken out of the trace: the tail behind the pulse falls to the simulator’s own level before the echo', () => {
    // A noise-free pulse into 1 km of 0.4 mm pair from a source of its nominal impedance; the echo of the
    // open end arrives one round trip after the launch, and before it the line shows only the launch's creep.
    const cable = PAIR_04;
    const d = 1000;
    const scenario: Scenario = { name: 'pair-04-1000m-open', cable, lengthM: d, end: 'open', features: [] };
    const acq = defaultAcquisition(scenario, 'pulse', 1, 0, 16);
    const dt = acq.sampleIntervalS;
    const n = acq.samples;
    const t0 = acq.preTriggerSamples;
    const widthS = acq.pulseWidthS ?? 2 * acq.riseTimeS;
    const y = simulate(buildNetwork(scenario).net, { samples: n, sampleIntervalS: dt, launchAtS: t0 * dt, riseTimeS: acq.riseTimeS, sourceV: 2, sourceOhm: cable.z0Ohm, excitation: { kind: 'pulse', widthS } });
    const rec = { y, t: new Float64Array(n).map((_, i) => (i - t0) * dt), n, dt, unit: 'V' as const };
    const L = findLaunch(rec, 'pulse', widthS / dt, estimateSlowNoise(y));
    expect(L.found).toBe(true);
    const fixed = pulseCreepRemoved(rec, L, lossModelThroughLine(libraryLoss(cable), cable.vf), cable.vf);
    expect(fixed).not.toBeNull();
    const arrival = t0 + (2 * d) / (cable.vf * SPEED_OF_LIGHT_M_PER_S) / dt;
    let raw = 0;
    let left = 0;
    for (let i = Math.ceil(L.settleIdx + 20); i < arrival - 10; i++) {
      raw = Math.max(raw, Math.abs(y[i] - L.baseline));
      left = Math.max(left, Math.abs(fixed![i] - L.baseline));
    }
    // The tail is a hundredth of the launch's peak; under a thousandth of it is left.
    expect(raw).toBeGreaterThan(0.005 * L.height);
    expect(left).toBeLessThan(0.001 * L.height);
  });
});

describe('the creep a wide launch pulse leaves behind', () => {
  it('is taken out by FFT with the direct convolution’s result', () => {
    // A 3,000-sample launch pulse at 1 ns on 60,000 samples of a thin pair: 1.8e8 products directly.
    const model = lossModelThroughLine(libraryLoss(PAIR_04), PAIR_04.vf);
    const n = 60_000;
    const dt = 1e-9;
    const y = new Float64Array(n).map((_, i) => (i >= 200 && i < 3200 ? 1 : 0) + 0.01 * Math.sin(i / 37));
    const rec = { y, t: new Float64Array(n).map((_, i) => i * dt), n, dt, unit: 'V' as const };
    const L = { ...findLaunch(rec, 'pulse', 3000, estimateSlowNoise(y)), mode: 'pulse' as const, found: true, onsetInRecord: true, clipped: false };
    const got = pulseCreepRemoved(rec, L, model, PAIR_04.vf);
    expect(got).not.toBeNull();
    // The direct sum, y[t] − Σ_k p_k·Δc[t − k] over the launch's samples k, at a few times.
    const c = incidentCreep(model, PAIR_04.vf, rec, 0);
    const from = Math.max(0, Math.floor(L.idx - 2 * Math.max(1, L.riseSamples)));
    const to = Math.min(n - 1, Math.ceil(L.settleIdx));
    for (const t of [3300, 10_000, 40_000, n - 1]) {
      let sum = 0;
      for (let k = from; k <= Math.min(to, t - 1); k++) sum += (y[k] - L.baseline) * (c[t - k] - c[t - k - 1]);
      expect(got![t]).toBeCloseTo(y[t] - sum, 9);
    }
  });
});
