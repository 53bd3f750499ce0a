/**
 * The incident step's creep on a line with series loss, taken out of a step record.
 *
 * A step launched into a long line whose conductors have resistance does not stay
 * flat: the line's input impedance Zc = √((R + jωL)/(jωC)) grows at low frequency,
 * so the level creeps up from the matched level towards the open-circuit one as the
 * wave travels out (telegrapher's equations, D. M. Pozar, "Microwave Engineering",
 * 4th ed., §2.1 and §2.7). In units of the incident step the creep is the step
 * response of ρ_in = (Zc − Z0)/(Zc + Z0), computed from the cable's loss by
 * incidentStep (loss-estimate.ts) with no free parameter. On a thin pair a kilometre
 * long it climbs by half the incident step over the record: far reflections, spread
 * over thousands of samples by the same loss, ride on it and read early, late or not
 * at all. With the cable's loss known, the creep is subtracted from the working
 * signal before detection and the edge fit, which then see the reflections alone.
 * A pulse is a step up and a step down: its creep is the launch pulse convolved with
 * the creep's increments, a slow tail behind the pulse, taken out of the trace itself
 * before the pulse record's baseline is read.
 *
 * The response is computed on a few nested time grids, each eight times finer than
 * the one before over the first eighth of its span, so the square-root rise just
 * after the launch is followed as closely as the slow climb at the record's end.
 */
import { fft, type LossModel } from './loss';
import { incidentStep } from './loss-estimate';
import { boxcar } from './stats';
import type { Launch, TraceRecord, WorkingSignal } from './steps';

/** Nested grids: spans T, T/8, T/64, T/512 of the record after time zero. */
const LEVELS = 4;

/** The creep ρ_in(t) at every sample of the record, time zero at sample t0 (0 before it). */
export function incidentCreep(model: LossModel, vf: number, rec: TraceRecord, t0: number): Float64Array {
  const n = rec.n;
  const out = new Float64Array(n);
  const r = model.resistiveNpPerM ?? 0;
  const s = model.skinNpPerMRootHz;
  const span = (n - 1 - t0) * rec.dt;
  if (!(span > 0) || !(r > 0 || s > 0)) return out;
  // From the coarsest grid to the finest, each overwriting the early part it resolves better.
  for (let level = 0; level < LEVELS; level++) {
    const tMax = span / 8 ** level;
    const last = Math.min(n - 1, Math.floor(t0 + tMax / rec.dt));
    const first = Math.max(0, Math.ceil(t0));
    if (last <= first) break;
    const ts: number[] = [];
    for (let i = first; i <= last; i++) ts.push((i - t0) * rec.dt);
    const c = incidentStep(r, s, vf, ts);
    for (let i = first; i <= last; i++) out[i] = c[i - first];
  }
  return out;
}

/**
 * Subtract the incident creep from a step record's working signal (u and its smoothed copy), in
 * place. Only with a loss known beforehand (the cable library's), a step record, and a time zero
 * the record shows: a launch in the record, or the record's own start at the launch.
 */
export function removeIncidentCreep(rec: TraceRecord, L: Launch, sig: WorkingSignal, model: LossModel | null, vf: number): boolean {
  if (sig.mode !== 'step' || !model || !(vf > 0)) return false;
  const t0 = L.found && L.onsetInRecord ? L.idx : L.zeroIdx;
  if (!(t0 >= 0 && t0 < rec.n - 1)) return false;
  const c = incidentCreep(model, vf, rec, t0);
  let any = false;
  for (let i = 0; i < rec.n; i++) {
    if (c[i] !== 0) any = true;
    sig.u[i] -= c[i];
  }
  if (!any) return false;
  sig.us.set(boxcar(sig.u, sig.smoothW));
  return true;
}

/**
 * A pulse record's trace less the creep its launch pulse leaves behind on a line with series loss:
 * the pulse is a step up and a step down, each creeping as incidentCreep has it, so the port shows
 * the launch pulse convolved with the creep's increments. Returns the corrected trace, or null where
 * it does not apply (no launch in the record, one clipped on its edge, no series loss).
 */
export function pulseCreepRemoved(rec: TraceRecord, L: Launch, model: LossModel | null, vf: number): Float64Array | null {
  if (L.mode !== 'pulse' || !model || !(vf > 0) || !L.found || !L.onsetInRecord || L.clippedOnEdge) return null;
  const n = rec.n;
  const from = Math.max(0, Math.floor(L.idx - 2 * Math.max(1, L.riseSamples)));
  const to = Math.min(n - 1, Math.ceil(L.settleIdx));
  if (!(to > from)) return null;
  const c = incidentCreep(model, vf, rec, 0);
  const dc = new Float64Array(n);
  for (let i = 1; i < n; i++) dc[i] = c[i] - c[i - 1];
  if (!dc.some((x) => x !== 0)) return null;
  const y = Float64Array.from(rec.y);
  const m = to - from + 1;
  if (m * (n - from) <= DIRECT_WORK) {
    for (let k = from; k <= to; k++) {
      const p = rec.y[k] - L.baseline;
      if (p === 0) continue;
      for (let t = k + 1; t < n; t++) y[t] -= p * dc[t - k];
    }
    return y;
  }
  // A wide launch pulse on a long record: the same convolution by FFT (Cooley–Tukey), not m·n products.
  const span = n - from;
  let size = 1;
  while (size < m + span) size <<= 1;
  const pr = new Float64Array(size);
  const pi = new Float64Array(size);
  const dr = new Float64Array(size);
  const di = new Float64Array(size);
  for (let j = 0; j < m; j++) pr[j] = rec.y[from + j] - L.baseline;
  for (let s = 1; s < span; s++) dr[s] = dc[s];
  fft(pr, pi);
  fft(dr, di);
  for (let k = 0; k < size; k++) {
    const re = pr[k] * dr[k] - pi[k] * di[k];
    pi[k] = pr[k] * di[k] + pi[k] * dr[k];
    pr[k] = re;
  }
  fft(pr, pi, true);
  for (let s = 1; s < span; s++) y[from + s] -= pr[s];
  return y;
}

/** Products a launch pulse's creep is convolved with directly; past that, by FFT. */
const DIRECT_WORK = 5e7;
