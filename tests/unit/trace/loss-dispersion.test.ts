import { describe, expect, it } from 'vitest';
import { analyzeTrace, type ParsedTrace } from '../../../shared/trace';
import { DB_PER_NEPER, dielectricSpread, erfc, fft, lineKernel } from '../../../shared/trace/loss';

/**
 * The causal dielectric spread: a loss rising as f, |H| = exp(−c·|ω|), has the phase
 * φ(ω) = (2c/π)·ω·ln(ω/ω_ref) (its Hilbert transform; W. I. Futterman, J. Geophys. Res. 67 (1962)
 * 5279), so every frequency under ω_ref arrives later than at the speed given. Checked here on the
 * kernel itself: its spectrum, its causality, and the delay of a frequency against the formula.
 */
describe('the causal dielectric spread', () => {
  const model = { skinNpPerMRootHz: 0, dielectricNpPerMPerHz: 2e-10 };
  const twoWayM = 600;
  const dt = 2e-9;
  const refHz = 1 / (2 * dt);
  const c = dielectricSpread(model, twoWayM); // 600·2e-10/2π = 19.1 ns

  /** The kernel's transform at angular frequency w, taken about its delay (sample `offset`). */
  function spectrumAt(k: { values: Float64Array; offset: number }, w: number): { mag: number; phase: number } {
    let re = 0;
    let im = 0;
    for (let i = 0; i < k.values.length; i++) {
      const t = (i - k.offset) * dt;
      re += k.values[i] * Math.cos(w * t);
      im -= k.values[i] * Math.sin(w * t);
    }
    return { mag: Math.hypot(re, im), phase: Math.atan2(im, re) };
  }

  it('keeps the magnitude of the zero-phase spread and adds the phase a causal loss has', () => {
    const k = lineKernel(model, twoWayM, dt, 4000, refHz);
    for (const f of [2e6, 5e6, 1e7]) {
      const w = 2 * Math.PI * f;
      const s = spectrumAt(k, w);
      expect(s.mag).toBeCloseTo(Math.exp(-c * w), 2);
      expect(s.phase).toBeCloseTo(((2 * c) / Math.PI) * w * Math.log(w / (2 * Math.PI * refHz)), 1);
    }
  });

  it('is causal: next to nothing arrives before the delay, and the spread is late where the Cauchy one is even', () => {
    const causal = lineKernel(model, twoWayM, dt, 4000, refHz);
    const even = lineKernel(model, twoWayM, dt, 4000);
    let before = 0;
    for (let i = 0; i < causal.offset; i++) before += Math.abs(causal.values[i]);
    expect(before).toBeLessThan(0.01);
    const centre = (k: { values: Float64Array; offset: number }, upTo: number) => {
      let m0 = 0;
      let m1 = 0;
      for (let i = 0; i < k.values.length && i - k.offset <= upTo; i++) {
        if (i - k.offset < -upTo) continue;
        m0 += k.values[i];
        m1 += k.values[i] * (i - k.offset);
      }
      return m1 / m0;
    };
    // Within ±200 samples (400 ns) of the delay: the even spread is centred on the delay, the causal one
    // well after it (its phase delay at 5 MHz alone is (2c/π)·ln(ω_ref/ω) = 12.2 ns·ln 50 = 48 ns).
    expect(Math.abs(centre(even, 200))).toBeLessThan(0.5);
    expect(centre(causal, 200)).toBeGreaterThan(10);
  });
});

/**
 * End to end: a step trace whose cable has a constant loss tangent, built in the frequency domain from
 * its permittivity, κ(ω) = 1 + (2·tanδ/π)·ln(ω_ref/ω) − j·tanδ (the constant-loss-tangent law to first
 * order in tanδ, whose real part follows from the loss by the Kramers–Kronig relations; Djordjevic et
 * al., IEEE Trans. EMC 43 (2001) 662), γ = jω·√κ/v. v is the speed at ω_ref, here the record's Nyquist
 * frequency, which is what the engine takes a velocity factor to be when no pulse width is given.
 * The check value is the generator's input: where the open is.
 */
describe('a far open on a cable with a lossy dielectric', () => {
  const dt = 0.5e-9;
  const n = 16384;
  const vf = 0.66;
  const v = vf * 299_792_458;
  const lengthM = 300;
  const t0 = 200e-9;
  const sigmaEdge = 1e-9;

  function trace(tanDelta: number): ParsedTrace {
    const re = new Float64Array(n);
    const im = new Float64Array(n);
    const wRef = Math.PI / dt;
    for (let k = 0; k <= n / 2; k++) {
      const w = (2 * Math.PI * k) / (n * dt);
      let ar = 1;
      let ai = 0;
      if (k > 0) {
        // √κ by the principal root, then exp(−2γd) with γ = jω√κ/v.
        const kr = 1 + ((2 * tanDelta) / Math.PI) * Math.log(wRef / w);
        const ki = -tanDelta;
        const m = Math.hypot(kr, ki);
        const sr = Math.sqrt((m + kr) / 2);
        const si = -Math.sqrt((m - kr) / 2);
        const gr = (-w * si) / v; // Re γ
        const gi = (w * sr) / v; // Im γ
        const amp = Math.exp(-2 * lengthM * gr) * Math.exp(-0.5 * (w * sigmaEdge) ** 2);
        const ph = -2 * lengthM * gi - w * t0;
        ar = amp * Math.cos(ph);
        ai = amp * Math.sin(ph);
      }
      re[k] = ar;
      im[k] = ai;
      if (k > 0 && k < n / 2) {
        re[n - k] = ar;
        im[n - k] = -ai;
      }
    }
    fft(re, im, true);
    const timeS = new Float64Array(n);
    const amplitude = new Float64Array(n);
    let echo = 0;
    for (let i = 0; i < n; i++) {
      const t = i * dt;
      timeS[i] = t;
      echo += re[i]; // the open's echo: the impulse summed into a step
      amplitude[i] = 0.5 * (1 + erf((t - t0) / (sigmaEdge * Math.SQRT2))) + echo;
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

  const erf = (x: number) => 1 - erfc(x);

  it('places the open at the speed given, not late by the dielectric’s slower low frequencies', () => {
    const tanDelta = 0.02;
    // α = π·f·tanδ/v nepers per metre (Pozar §2.7), as the library would hold it.
    const loss = [1e6, 1e7, 1e8].map((f) => ({ frequencyHz: f, dbPer100m: ((Math.PI * f * tanDelta) / v) * 100 * DB_PER_NEPER }));
    const a = analyzeTrace(trace(tanDelta), { vf, loss });
    const end = a.events[a.events.length - 1];
    // Within 0.25 % (the product allows 1 %); the slower low frequencies alone would put it about
    // (tanδ/π)·ln(ω_ref/ω_edge) ≈ 2 % late.
    expect(Math.abs(end.distanceM - lengthM) / lengthM).toBeLessThan(0.0025);
    expect(end.windowStartM).toBeLessThanOrEqual(lengthM);
    expect(end.windowEndM).toBeGreaterThanOrEqual(lengthM);
  });
});
