import { describe, expect, it } from 'vitest';
import { SPEED_OF_LIGHT_M_PER_S } from '../../../shared/cable/propagation';
import { analyzeTrace, type ParsedTrace } from '../../../shared/trace';
import { DB_PER_NEPER, erfc, skinStep } from '../../../shared/trace/loss';

/**
 * A step trace built from the line model itself: a Gaussian-edged launch (σ = 2 ns) at 200 ns and
 * one reflection ρ at round trip D, spread by the skin effect's erfc(K/2√t) edge (R. L. Wigington
 * and N. S. Nahman, Proc. IRE 45 (1957) 166) with t50 = 1.099·K² = 60 ns. The check values are the
 * generator's inputs: D, ρ and K.
 */
function skinTrace(opts: { rho: number; roundTripNs: number; t50Ns: number; noise: number; seed: number }): ParsedTrace {
  const dtNs = 1;
  const n = 4000;
  const launchNs = 200;
  const sigmaNs = 2;
  const k = Math.sqrt((opts.t50Ns * 1e-9) / 1.099);
  const gauss = (t: number) => 0.5 * erfc(-t / (sigmaNs * Math.SQRT2));
  // The event's shape: the launch edge convolved with the erfc edge, on a 0.1 ns grid.
  const fine = 0.1;
  const shape = (tNs: number) => {
    let acc = 0;
    for (let u = -8 * sigmaNs; u <= 8 * sigmaNs; u += fine) {
      const w = gauss(u + fine / 2) - gauss(u - fine / 2);
      acc += w * skinStep(k, (tNs - u) * 1e-9);
    }
    return acc;
  };
  let seed = opts.seed;
  const rnd = () => {
    // Park–Miller minimal standard generator, then Box–Muller for a normal deviate.
    seed = (seed * 16807) % 2147483647;
    const u1 = seed / 2147483647;
    seed = (seed * 16807) % 2147483647;
    const u2 = seed / 2147483647;
    return Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
  };
  const timeS = new Float64Array(n);
  const amplitude = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const t = i * dtNs;
    timeS[i] = t * 1e-9;
    amplitude[i] = 0.5 * gauss(t - launchNs) + 0.5 * opts.rho * shape(t - launchNs - opts.roundTripNs) + opts.noise * rnd();
  }
  return {
    timeS,
    amplitude,
    amplitudeUnit: 'V',
    metadata: {},
    hints: {},
    layout: { kind: 'time-amplitude', delimiter: ',', decimal: '.', timeUnit: 'ns', amplitudeUnit: 'V' },
    warnings: [],
  } as unknown as ParsedTrace;
}

const VF = 0.66;
const metresFor = (roundTripNs: number) => (VF * SPEED_OF_LIGHT_M_PER_S * roundTripNs * 1e-9) / 2;

/** The skin loss that gives t50 over the round trip, as attenuation points a library would hold. */
function lossPoints(roundTripNs: number, t50Ns: number) {
  const k = Math.sqrt((t50Ns * 1e-9) / 1.099);
  const twoWayM = 2 * metresFor(roundTripNs);
  // K = 2d·s/√π, so s = K√π/2d nepers per metre per √Hz.
  const s = (k * Math.sqrt(Math.PI)) / twoWayM;
  return [1e6, 1e7, 1e8].map((f) => ({ frequencyHz: f, dbPer100m: s * Math.sqrt(f) * 100 * DB_PER_NEPER }));
}

describe('the line fit', () => {
  const roundTripNs = 2500.4;
  const t50Ns = 60;
  const truthM = metresFor(roundTripNs); // 247.36 m

  it('times a skin-spread edge at its lossless arrival and reads its full ρ, with the library loss', () => {
    for (const seed of [11, 12, 13]) {
      const a = analyzeTrace(skinTrace({ rho: -0.8, roundTripNs, t50Ns, noise: 0.002, seed }), { vf: VF, loss: lossPoints(roundTripNs, t50Ns) });
      expect(a.lossSource).toBe('library');
      expect(a.events).toHaveLength(1);
      const e = a.events[0];
      // Within 0.05 % (12 cm): the 10–50 % tangent reading of this edge lands about 0.04·K² ≈ 2 ns early
      // and its 50 % point 60 ns late; the fit has neither bias.
      expect(Math.abs(e.distanceM - truthM)).toBeLessThan(0.0005 * truthM);
      expect(e.reflectionCoefficient).toBeCloseTo(-0.8, 1);
      expect(Math.abs(e.reflectionCoefficientRaw ?? 0)).toBeLessThan(Math.abs(e.reflectionCoefficient));
      expect(e.pathLossDb).toBeGreaterThan(0);
      expect(e.windowStartM).toBeLessThanOrEqual(truthM);
      expect(e.windowEndM).toBeGreaterThanOrEqual(truthM);
      expect(e.lossCorrected).toBe(true);
    }
  });

  it('estimates the loss from the trace when the library has none, and says so', () => {
    const a = analyzeTrace(skinTrace({ rho: -0.8, roundTripNs, t50Ns, noise: 0.002, seed: 5 }), { vf: VF });
    expect(a.lossSource).toBe('estimated');
    // The estimate's attenuation at 10 MHz is the generator's within 25 %.
    const at10 = a.lossDbPer100m?.find((p) => p.frequencyHz === 1e7)?.dbPer100m ?? 0;
    const truth10 = lossPoints(roundTripNs, t50Ns)[1].dbPer100m;
    expect(at10 / truth10).toBeGreaterThan(0.75);
    expect(at10 / truth10).toBeLessThan(1.25);
    expect(Math.abs(a.events[0].distanceM - truthM)).toBeLessThan(0.002 * truthM);
  });

  it('keeps the line fit of a far end the record stops on mid-rise when the library overstates the loss, holding |ρ| ≤ 1', () => {
    // The open arrives 300 ns before the record ends with an edge faster (t50 = 60 ns) than the library's
    // loss gives (t50 = 150 ns): a free fit reads its height past 1 to match the slow model's tail, which
    // no reflection can have (|ρ| ≤ 1, the wave it met), so the height is held at 1 and the delay refitted.
    const far = 3500;
    const farM = metresFor(far); // 346.26 m
    for (const seed of [21, 22, 23]) {
      const a = analyzeTrace(skinTrace({ rho: 1, roundTripNs: far, t50Ns: 60, noise: 0.002, seed }), { vf: VF, loss: lossPoints(far, 150) });
      const e = a.events[a.events.length - 1];
      expect(e.pathLossDb).not.toBeNull();
      expect(e.lossCorrected).toBe(true);
      expect(e.reflectionCoefficient).toBeCloseTo(1, 6);
      expect(Math.abs(e.distanceM - farM)).toBeLessThan(0.01 * farM); // the product's requirement: max(0.5 m, 1 %)
      expect(e.windowStartM).toBeLessThanOrEqual(farM);
      expect(e.windowEndM).toBeGreaterThanOrEqual(farM);
    }
  });

  it('reports no loss on a lossless edge', () => {
    const a = analyzeTrace(skinTrace({ rho: 0.5, roundTripNs: 1000, t50Ns: 0, noise: 0.001, seed: 3 }), { vf: VF });
    expect(a.lossSource).toBe('none');
    expect(a.lossDbPer100m).toEqual([]);
    expect(a.events[0].reflectionCoefficient).toBeCloseTo(0.5, 2);
    expect(Math.abs(a.events[0].distanceM - metresFor(1000))).toBeLessThan(0.05);
  });
});
