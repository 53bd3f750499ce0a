import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import type { ReflectionEvent } from '../../../shared/schemas/trace-analysis';
import { classifyEvent, ownReflections } from '../../../shared/trace/classify';
import { detectEdges } from '../../../shared/trace/detection';
import { findEchoes, resolveCableEnd } from '../../../shared/trace/echoes';
import { extremes, findLaunch } from '../../../shared/trace/launch';
import { estimateNoise, estimateSlowNoise } from '../../../shared/trace/noise';
import { buildWorkingSignal } from '../../../shared/trace/signal';
import { madSigma, normalUpperQuantile } from '../../../shared/trace/stats';
import type { Measured, TraceRecord } from '../../../shared/trace/steps';
import { COAX_50 } from '../../../scripts/sim/cables';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { defaultAcquisition, simulateScenario, type Scenario } from '../../../scripts/sim/scenario';
import { parsedTrace } from '../../support/parsed-trace';

const record = (y: Float64Array, dt = 1e-9, t0 = 0): TraceRecord => {
  const n = y.length;
  return { y, t: new Float64Array(n).map((_, i) => t0 + i * dt), n, dt, unit: 'V' };
};
const parsed = (r: TraceRecord, unit: 'V' | 'rho' = 'V') => parsedTrace(r.y, { timeS: r.t, unit });
const edge = (h: number, opts: Partial<Measured> = {}): Measured => ({
  onsetIdx: 0,
  t50Idx: 0,
  riseSamples: 4,
  height: h,
  peakDev: h,
  blip: false,
  snr: 50,
  w: 4,
  endIdx: 0,
  fLo: 0.1,
  echoPeak: h,
  levelBefore: 0,
  stillMoving: 0,
  ...opts,
});

describe('statistics', () => {
  it('gives the Gaussian upper quantile', () => {
    // Φ⁻¹(0.975) = 1.959964, Φ⁻¹(1 − 10⁻⁶) = 4.753424 (Abramowitz & Stegun, table 26.1 / 26.2);
    // the rational approximation 26.2.23 is good to 4.5·10⁻⁴.
    expect(Math.abs(normalUpperQuantile(0.025) - 1.959964)).toBeLessThan(4.5e-4);
    expect(Math.abs(normalUpperQuantile(1e-6) - 4.753424)).toBeLessThan(4.5e-4);
    expect(normalUpperQuantile(0.5)).toBeCloseTo(0, 3);
  });

  it('reads σ from the median absolute deviation of Gaussian noise', () => {
    const rnd = gaussianSource(3);
    const x = new Float64Array(20000).map(() => 0.25 * rnd());
    // 1.4826·MAD estimates σ of a normal sample (Hampel 1974); 20 000 draws hold it within 3 %.
    expect(Math.abs(madSigma(x, 0, x.length) / 0.25 - 1)).toBeLessThan(0.03);
  });
});

describe('noise', () => {
  it('measures white noise on a trace with edges, and ignores a stretch held at the recorder’s limit', () => {
    const rnd = gaussianSource(4);
    const y = new Float64Array(10000).map((_, i) => (i > 3000 ? 1 : 0) + (i > 7000 ? 0.5 : 0) + 0.01 * rnd());
    expect(Math.abs(estimateNoise(y) / 0.01 - 1)).toBeLessThan(0.05);
    const clipped = y.map((v, i) => (i > 6000 ? 1.2 : Math.min(v, 1.2)));
    expect(Math.abs(estimateNoise(clipped) / 0.01 - 1)).toBeLessThan(0.05);
  });

  it('floors a noise-free quantised record at q/√12', () => {
    // Uniform rounding noise of a quantiser with step q has σ = q/√12 (Widrow & Kollár, ch. 4).
    const q = 2 / 256;
    const y = new Float64Array(5000).map((_, i) => Math.round((0.8 * (1 - Math.exp(-i / 900))) / q) * q);
    expect(estimateNoise(y)).toBeCloseTo(q / Math.sqrt(12), 9);
  });

  it('sees slow (coloured) noise that first differences miss', () => {
    // AR(1) noise x[i] = a·x[i−1] + e[i], a = 0.98: its σ is σe/√(1 − a²) ≈ 5σe, while first
    // differences show only √(2(1 − a))·5σe/√2 ≈ σe (common practice for AR(1) processes).
    const rnd = gaussianSource(5);
    let x = 0;
    const y = new Float64Array(20000).map(() => (x = 0.98 * x + 0.01 * rnd()));
    expect(estimateNoise(y)).toBeLessThan(0.015);
    expect(estimateSlowNoise(y)).toBeGreaterThan(0.03);
  });
});

describe('launch and mode', () => {
  const route: Scenario = {
    name: 'l',
    cable: COAX_50,
    lengthM: 60,
    end: 'open',
    features: [{ kind: 'shunt', atM: 23.5, rOhm: 100 }],
  };

  it('spans the range from the fifth most extreme three-point averages, found in one pass', () => {
    // Hand-worked: the three-point averages of [0, 3, 0, 0, 9, 0, 0, -6, 0, 0] are
    // 0 (end), 1, 1, 3, 3, 3, −2, −2, −2, 0 (end); the third largest is 3, the third smallest −2.
    const y = new Float64Array([0, 3, 0, 0, 9, 0, 0, -6, 0, 0]);
    expect(extremes(y, 3)).toEqual({ lo: -2, hi: 3 });
    expect(extremes(y, 1)).toEqual({ lo: -2, hi: 3 });
    // A record of n = 100 001 samples y_i = i: the averages are i for 1 ≤ i ≤ n − 2 and the
    // ends are 0 and n − 1, so all of 0 … n − 1 occur once: fifth largest n − 5, fifth smallest 4.
    const n = 100001;
    const ramp = new Float64Array(n).map((_, i) => i);
    expect(extremes(ramp, 5)).toEqual({ lo: 4, hi: n - 5 });
  });

  it('reads a pulse record that starts during the launch, with time zero from its axis', () => {
    const acq = { ...defaultAcquisition(route, 'pulse', 9, 0.002, 12), preTriggerSamples: 0, timeOfFirstSampleS: 0 };
    const sim = simulateScenario(route, acq);
    const L = findLaunch(record(sim.volts, acq.sampleIntervalS), 'auto', null);
    expect(L.found && L.mode).toBe('pulse');
    expect(L.onsetInRecord).toBe(false);
    expect(L.zeroIdx).toBeCloseTo(0, 9);
    // The simulated pulse is 2 rise times wide: its width at half height, in samples.
    expect(Math.abs((L.widthSamples ?? 0) - (acq.pulseWidthS ?? 0) / acq.sampleIntervalS)).toBeLessThanOrEqual(2);
  });

  it('reads a launch of either polarity', () => {
    const acq = defaultAcquisition(route, 'pulse', 10, 0.002, 12);
    const sim = simulateScenario(route, acq);
    const up = findLaunch(record(sim.volts, acq.sampleIntervalS), 'auto', null);
    const down = findLaunch(
      record(
        sim.volts.map((v) => -v),
        acq.sampleIntervalS,
      ),
      'auto',
      null,
    );
    expect([up.mode, down.mode]).toEqual(['pulse', 'pulse']);
    expect(Math.sign(up.height)).toBe(1);
    expect(Math.sign(down.height)).toBe(-1);
    expect(Math.abs(up.height + down.height)).toBeLessThan(0.02);
  });

  it('keeps a step record a step when a fault near the instrument pulls the level down', () => {
    // 20 Ω shunt at 0.8 m on 50 Ω: ρ = (14.3 − 50)/(14.3 + 50) = −0.56, so the level falls to 0.44.
    const near: Scenario = {
      name: 'n',
      cable: COAX_50,
      lengthM: 30,
      end: 'open',
      features: [{ kind: 'shunt', atM: 0.8, rOhm: 20 }],
    };
    const acq = { ...defaultAcquisition(near, 'step', 11, 0.002, 12), sampleIntervalS: 0.1e-9, riseTimeS: 0.5e-9 };
    acq.samples = 4000;
    acq.preTriggerSamples = 400;
    acq.timeOfFirstSampleS = -400 * acq.sampleIntervalS;
    const sim = simulateScenario(near, acq);
    expect(findLaunch(record(sim.volts, acq.sampleIntervalS), 'auto', null).mode).toBe('step');
    const a = analyzeTrace(parsed(record(sim.volts, acq.sampleIntervalS, acq.timeOfFirstSampleS)), { vf: COAX_50.vf, z0Ohm: 50 });
    expect(a.events[0].type).toBe('impedance-drop');
    expect(Math.abs(a.events[0].distanceM - 0.8)).toBeLessThanOrEqual(0.5);
  });

  it('ends the launch at its plateau, so a rise soon after it is an event near the instrument', () => {
    // Series 100 Ω at 2.5 m on 50 Ω coax: ρ = R/(R + 2·Z0) = 0.5 (lumped series element,
    // Pozar, "Microwave Engineering", 4th ed., §2.3), returning 2·2.5/(0.66·c) = 25 ns after a
    // launch that rises in about 4 ns: the level holds for some 20 ns, then rises again.
    const near: Scenario = {
      name: 's',
      cable: COAX_50,
      lengthM: 40,
      end: 'matched',
      features: [{ kind: 'series', atM: 2.5, rOhm: 100 }],
    };
    const acq = { ...defaultAcquisition(near, 'step', 12, 0.002, 12), sampleIntervalS: 1e-9, riseTimeS: 4e-9 };
    acq.samples = 1000;
    acq.preTriggerSamples = 100;
    acq.timeOfFirstSampleS = -100e-9;
    const sim = simulateScenario(near, acq);
    const rec = record(sim.volts, 1e-9, acq.timeOfFirstSampleS);
    const L = findLaunch(rec, 'auto', null);
    expect(L.mode).toBe('step');
    expect(L.riseSamples).toBeLessThanOrEqual(8);
    const a = analyzeTrace(parsed(rec), { vf: COAX_50.vf, z0Ohm: 50 });
    expect(a.events).toHaveLength(1);
    expect(a.events[0].type).toBe('impedance-rise');
    expect(Math.abs(a.events[0].distanceM - 2.5)).toBeLessThanOrEqual(0.5);
    expect(Math.abs(a.events[0].reflectionCoefficient - 0.5)).toBeLessThanOrEqual(0.05 + 0.2 * 0.5);
  });

  it('flags a clipped launch and never reports |ρ| above 1 from it', () => {
    const acq = defaultAcquisition(route, 'pulse', 12, 0.002, 12);
    acq.impairments.fullScaleV = 0.7;
    const sim = simulateScenario(route, acq);
    const a = analyzeTrace(parsed(record(sim.volts, acq.sampleIntervalS, acq.timeOfFirstSampleS)), { vf: COAX_50.vf });
    expect(a.warnings.map((w) => w.code)).toContain('LAUNCH_CLIPPED');
    for (const e of a.events) expect(Math.abs(e.reflectionCoefficient)).toBeLessThanOrEqual(1);
  });
});

describe('detection', () => {
  it('holds the false events on pure noise near the stated rate', () => {
    // 1 false event per 100 traces is the stated target; over 100 noise-only step records the
    // count is Poisson with mean about 1, so more than 5 would happen by chance under 0.1 % of the time.
    let falseEvents = 0;
    for (let s = 0; s < 100; s++) {
      const rnd = gaussianSource(100 + s);
      const y = new Float64Array(4000).map((_, i) => (i >= 200 ? 1 : 0) + 0.01 * rnd());
      const rec = record(y);
      const sigma0 = estimateNoise(y);
      const L = findLaunch(rec, 'auto', null, estimateSlowNoise(y));
      const sig = buildWorkingSignal(rec, L, sigma0);
      falseEvents += detectEdges(sig, { falseEventsPerTrace: 0.01, rhoMin: 0 }).candidates.length;
    }
    expect(falseEvents).toBeLessThanOrEqual(5);
  });

  it('finds a weak step the noise would hide sample by sample', () => {
    // ρ = 0.13 (a 15 Ω series joint on 50 Ω: 15/115) with noise σ a quarter of it (12 dB).
    const rnd = gaussianSource(7);
    const y = new Float64Array(6000).map((_, i) => (i >= 300 ? 1 : 0) + (i >= 3000 ? 0.13 : 0) + 0.0326 * rnd());
    const rec = record(y);
    const L = findLaunch(rec, 'auto', null, estimateSlowNoise(y));
    const sig = buildWorkingSignal(rec, L, estimateNoise(y));
    const found = detectEdges(sig, { falseEventsPerTrace: 0.01, rhoMin: 0.005 }).candidates;
    expect(found.length).toBe(1);
    expect(Math.abs(found[0].i - 3000)).toBeLessThanOrEqual(2 * found[0].w);
  });
});

describe('classification', () => {
  it('types by the ρ bands and refers ρ past what stands in front', () => {
    // Lumped resistor: round trip (1 − |ρ|)²; change of line: 1 − ρ² (Pozar, §2.3).
    const shuntThenEnd = [edge(-0.5), edge(0.25)];
    const own = ownReflections(shuntThenEnd, [false, false]);
    expect(own[1].rho).toBeCloseTo(1, 6);
    const section = [edge(-0.3), edge(0.3 * 0.91), edge(0.9 * 0.91 * 0.91)];
    const ownSection = ownReflections(section, [false, false, false]);
    expect(ownSection[1].rho).toBeCloseTo(0.3, 6);
    // An 8 Ω shunt on 30 Ω reads ρ = (6.3 − 30)/(6.3 + 30) = −0.65: not a short while line shows beyond it.
    const fault = [edge(-0.65, { riseSamples: 40 }), edge(0.1, { riseSamples: 60 })];
    expect(classifyEvent(fault[0], ownReflections(fault, [false, false])[0], 4)).toBe('impedance-drop');
    expect(classifyEvent(edge(-0.85), { rho: -0.85, transmission: 1, isLast: false }, 4)).toBe('short');
    expect(classifyEvent(edge(0.79), { rho: 0.79, transmission: 1, isLast: false }, 4)).toBe('impedance-rise');
  });

  it('reads a last edge still rising as cut short only where its level window meets the record’s end', () => {
    // A bridged tap's junction, ρ −0.30, the last edge reported: its level still moves 15 % because the stub's
    // end arrives (too weak to report). Inside the record that is no cut-short end; at the record's end it may be.
    const junction = (endIdx: number) => edge(-0.3, { riseSamples: 130, stillMoving: 0.15, endIdx, lossCorrected: true });
    const last = { rho: -0.3, transmission: 1, isLast: true };
    expect(classifyEvent(junction(2200), last, 78, 9999)).toBe('impedance-drop');
    expect(classifyEvent(junction(9999), last, 78, 9999)).toBe('short');
  });
});

describe('echoes', () => {
  it('recovers a mismatched source from the echo at twice an event’s round trip', () => {
    // Port sees (1 + ρs)·ρ, then (1 + ρs)·ρs·ρ² at twice the time: ρs = r/(1 − r), r = A₂/A₁².
    // A 25 Ω source on 50 Ω has ρs = −1/3; an open end ρ = 1.
    const rhoS = -1 / 3;
    const merged = [edge((1 + rhoS) * 1, { onsetIdx: 1000 }), edge((1 + rhoS) * rhoS, { onsetIdx: 2000 })];
    const found = findEchoes(merged, (m) => m.onsetIdx);
    expect(found.sourceRho).toBeCloseTo(rhoS, 6);
    expect(found.of).toEqual([null, 0]);
  });

  it('marks a bounce between two reflectors behind a later event', () => {
    // Reflectors at 100 and 130 samples, end at 500: one bounce returns at 500 + 30 with about ρa·ρb of it.
    const merged = [
      edge(-0.3, { onsetIdx: 100 }),
      edge(0.25, { onsetIdx: 130 }),
      edge(0.6, { onsetIdx: 500 }),
      edge(-0.05, { onsetIdx: 530 }),
    ];
    expect(findEchoes(merged, (m) => m.onsetIdx).of).toEqual([null, null, null, 2]);
  });
  it('sizes a reflector’s own bounce with |ρ| ≤ 1 for its second reflection, and keeps what is larger', () => {
    // Bridged tap: junction ρ = −1/3 at 100 samples, the stub's open end at 400 seen 0.43 (the junction
    // splits the wave, so its own ρ reads 0.45 though the stub end reflects all of it). Its bounce off the
    // junction's back returns at 400 + 300 with A_b·ρ_a'·ρ_b = 0.43·(1/3)·1 ≈ 0.14 (Bewley, ch. 3); the
    // product of the read ρ (0.3·0.45) would bound it at 0.10 and leave it unflagged.
    const merged = (echo: number) => [
      edge(-0.3, { onsetIdx: 100 }),
      edge(0.43, { onsetIdx: 400 }),
      edge(echo, { onsetIdx: 700 }),
    ];
    const own = [-0.3, 0.45, 0];
    expect(findEchoes(merged(-0.14), (m) => m.onsetIdx, own).of).toEqual([null, null, 1]);
    // A feature there larger than any bounce could be (|ρ_a|·A_b ≈ 0.13, with the 1.5 allowance 0.21) stays a fault.
    expect(findEchoes(merged(-0.3), (m) => m.onsetIdx, own).of).toEqual([null, null, null]);
  });
  it('takes a bridged tap’s two ways round for an echo, though it is larger than the arrival it copies', () => {
    // Three equal lines at the junction: ρ_a = −1/3, 2/3 passes into each other line (Pozar §2.3). An open
    // stub's end at 400 samples is seen (2/3)²·1 = 0.444; the shorted far end at 900 is seen (2/3)²·(−1).
    // Back from the far end, into the stub and back, and the other way round: 2·(2/3)³·(−1) = −0.593 at
    // 900 + (400 − 100), larger than the −0.444 it copies.
    const merged = (echo: number, at = 1200) => [
      edge(-1 / 3, { onsetIdx: 100 }),
      edge(4 / 9, { onsetIdx: 400 }),
      edge(-4 / 9, { onsetIdx: 900 }),
      edge(echo, { onsetIdx: at }),
    ];
    const own = [-1 / 3, 0.5, -0.5, 0];
    // Seen from the junction the stub and the line beyond are alike (either is "the branch"), so the copy
    // may be tied to either arrival.
    const of = findEchoes(merged(-16 / 27), (m) => m.onsetIdx, own).of;
    expect(of.slice(0, 3)).toEqual([null, null, null]);
    expect([1, 2]).toContain(of[3]);
    // The wrong sign (an open stub keeps the far end's sign), the wrong time or more than the two ways
    // round can give (2·(2/3)·0.444 with a 1.2 allowance: 0.73) stays a fault.
    expect(findEchoes(merged(+16 / 27), (m) => m.onsetIdx, own).of).toEqual([null, null, null, null]);
    expect(findEchoes(merged(-16 / 27, 1290), (m) => m.onsetIdx, own).of).toEqual([null, null, null, null]);
    expect(findEchoes(merged(-0.8), (m) => m.onsetIdx, own).of).toEqual([null, null, null, null]);
  });
  it('never takes for an echo a feature that arrives before the path it would have travelled', () => {
    // A shunt read −0.37 at 1000 samples (rise 100) and a spread far end, −0.06 with a 600-sample rise. Its
    // re-reflection at the source would return at 2000 or later (a longer path only spreads it more), so an end
    // at 1850 is no echo of it, however slow its own edge; the same edge at 2150 may be.
    const merged = (at: number) => [edge(-0.37, { onsetIdx: 1000, riseSamples: 100 }), edge(-0.06, { onsetIdx: at, riseSamples: 600 })];
    expect(findEchoes(merged(1850), (m) => m.onsetIdx).of).toEqual([null, null]);
    expect(findEchoes(merged(2150), (m) => m.onsetIdx).of).toEqual([null, 0]);
  });
  it('takes for a source echo at twice a strong event’s round trip only what the source could return', () => {
    // An event read 0.4 at 1000 samples: re-reflected at an unmeasured source it returns at 2000 with r·0.4²,
    // |r| = |ρ_s/(1 + ρ_s)| ≤ 1.5 (ρ_s from −0.6 to 1), so at most 0.24 (+0.02 for the reading). A −0.1 there may
    // be that echo; a −0.35 is a fault of its own, which a flag would hide.
    const merged = (echo: number) => [edge(0.4, { onsetIdx: 1000 }), edge(echo, { onsetIdx: 2000 })];
    expect(findEchoes(merged(-0.1), (m) => m.onsetIdx).of).toEqual([null, 0]);
    expect(findEchoes(merged(-0.35), (m) => m.onsetIdx).of).toEqual([null, null]);
  });
  it('lets a loss-spread event’s source echo start late by the spread its doubled path adds', () => {
    // A shunt read −0.54 at 3660 samples whose lossy edge rises over 283: its copy re-reflected at the source
    // travels twice the path, spread up to four times as much (skin loss grows as the path squared), so its foot
    // may lag 2·3660 by up to 0.6·283·(4 − 2) = 340 samples. A weak edge 300 late is that copy; 400 late it is not.
    // The weak edge stands 7.9 deviations out, as read on the record this came from.
    const merged = (at: number) => [edge(-0.54, { onsetIdx: 3660, riseSamples: 283 }), edge(0.007, { onsetIdx: at, riseSamples: 48, snr: 7.9 })];
    expect(findEchoes(merged(7620), (m) => m.onsetIdx).of).toEqual([null, 0]);
    expect(findEchoes(merged(7720), (m) => m.onsetIdx).of).toEqual([null, null]);
  });
  it('does not take a well-read edge sharper than a spread event for its late source copy', () => {
    // An event read −0.44 at 713 samples rising over 185, and a strong open 102 samples after twice that round
    // trip rising over only 119: a copy that travelled twice as far is no sharper, so its foot lags by at most
    // 0.6 of its own rise (71 samples) and the open stays a fault. The same edge as spread as the event would be
    // its copy, and so would a weak edge whose rise is read too poorly to tell.
    const merged = (rise: number, snr: number) => [
      edge(-0.44, { onsetIdx: 713, riseSamples: 185 }),
      edge(0.24, { onsetIdx: 1528, riseSamples: rise, snr }),
    ];
    expect(findEchoes(merged(119, 60), (m) => m.onsetIdx).of).toEqual([null, null]);
    // The same open read 19.8 deviations out at another filter scale: its rise is still read well.
    expect(findEchoes(merged(119, 19.8), (m) => m.onsetIdx).of).toEqual([null, null]);
    expect(findEchoes(merged(200, 60), (m) => m.onsetIdx).of).toEqual([null, 0]);
    expect(findEchoes(merged(119, 8), (m) => m.onsetIdx).of).toEqual([null, 0]);
  });
  it('drops weak features past the cable’s end, flagged or not, and the echoes of what it drops', () => {
    // A step record's open end read at 0.26 after loss: past it the line is not seen (Bewley,
    // "Traveling Waves on Transmission Systems", ch. 3), so a feature under 0.3 of it is an
    // echo or the end's own tail. Features: series 0.31 at 289 m, open 0.26 at 331 m, a
    // strong echo 0.11 at 368 m (kept, flagged), weak ones at 405, 500 (echo of 405) and 623 m
    // (flagged echo of the end): the last three go.
    const ev = (distanceM: number, rho: number, type: ReflectionEvent['type'], likelyMultipleOf: number | null, index: number) =>
      ({ index, distanceM, reflectionCoefficient: rho, reflectionCoefficientRaw: rho, type, likelyMultipleOf, isCableEnd: false }) as ReflectionEvent;
    const events = [
      ev(289, 0.31, 'impedance-rise', null, 0),
      ev(331, 0.26, 'open', null, 1),
      ev(368, 0.11, 'open', 1, 2),
      ev(405, 0.059, 'open', null, 3),
      ev(500, 0.029, 'open', 3, 4),
      ev(623, -0.02, 'impedance-drop', 1, 5),
    ];
    const warnings = resolveCableEnd(events);
    expect(events.map((e) => [e.distanceM, e.index, e.likelyMultipleOf, e.isCableEnd])).toEqual([
      [289, 0, null, false],
      [331, 1, null, true],
      [368, 2, 1, false],
    ]);
    expect(warnings.map((w) => w.code)).toEqual(['AFTER_END_IGNORED']);
    expect(warnings[0].message).toMatch(/^3 weak feature/);
  });
});
