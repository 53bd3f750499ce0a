/**
 * Detection: where the working signal steps.
 *
 * A four-window step filter F = (A − 3B + 3C − D)/2 over adjacent windows of w
 * samples, evaluated at scales w, 3w, 9w, … (a multi-scale edge detector in
 * the sense of S. Mallat and S. Zhong, "Characterization of signals from
 * multiscale edges", IEEE Trans. PAMI 14 (1992) 710). It returns the step
 * height for a step and zero for any constant, linear or quadratic baseline,
 * so the slow creep of a lossy line and DC drift do not raise events. Its
 * threshold is a multiple of the filter's own robust noise (1.4826·MAD,
 * Hampel 1974). Finer scales win, so sharp events keep their resolution and
 * slow, far edges are still found at coarse scales.
 */
import { madSigma, prefixSums } from './stats';
import type { Candidate, Launch, Measured, WorkingSignal } from './steps';

interface ScaleResult {
  candidates: Candidate[];
  thr: number;
}

/** Robust noise of F at one scale, never below what white noise of the measured level would give. */
function filterNoise(F: Float64Array, count: number, w: number, stride: number, sig: WorkingSignal): number {
  const theoretical = sig.mode === 'step' ? (2.24 * sig.sigmaU) / Math.sqrt(w) : 2.24 * sig.scaleForPulse * Math.sqrt(w) * 0.6;
  // Differences of F four windows apart: the slowly varying residue a lossy line's creep
  // leaves in F cancels, while the noise (independent that far apart) stays.
  const lag = Math.max(1, Math.round((4 * w) / stride));
  let sigmaF: number;
  if (count > lag + 8) {
    const m = count - lag;
    const step = Math.max(1, Math.floor(m / 4001));
    const dF = new Float64Array(Math.ceil(m / step));
    for (let k = 0, j = 0; k < m; k += step, j++) dF[j] = F[k] - F[k + lag];
    sigmaF = Math.max(madSigma(dF, 0, dF.length) / Math.SQRT2, theoretical);
  } else sigmaF = Math.max(madSigma(F, 0, count), theoretical);
  return Math.max(sigmaF, 1e-12);
}

/** The filter at scale w, its threshold, and the extreme of each run above it. */
function filterScale(
  P: Float64Array,
  Fbuf: Float64Array,
  w: number,
  sig: WorkingSignal,
  kSigma: number,
  rhoMin: number,
): ScaleResult | null {
  const n = P.length - 1;
  const from = sig.start + 2 * w;
  const to = n - 2 * w;
  if (to <= from) return null;
  // Coarse scales change slowly; a stride of w/4 keeps their peaks and saves most of the work.
  const stride = Math.max(1, Math.floor(w / 4));
  const count = Math.floor((to - 1 - from) / stride) + 1;
  const F = Fbuf.subarray(0, count);
  const inv = 1 / (2 * w);
  // (A − 3B + 3C − D)/2 over window means, written on the prefix sums.
  for (let k = 0, i = from; k < count; k++, i += stride) {
    F[k] = (-P[i - 2 * w] + 4 * P[i - w] - 6 * P[i] + 4 * P[i + w] - P[i + 2 * w]) * inv;
  }
  const sigmaF = filterNoise(F, count, w, stride, sig);
  const thr = Math.max(kSigma * sigmaF, rhoMin);
  const candidates: Candidate[] = [];
  let runStart = -1;
  let runSign = 0;
  let best = -1;
  let bestAbs = 0;
  const flush = () => {
    if (best >= 0) candidates.push({ i: from + best * stride, w, sign: runSign, f: F[best], snr: bestAbs / sigmaF });
    best = -1;
    bestAbs = 0;
    runStart = -1;
  };
  for (let k = 0; k < count; k++) {
    const v = F[k];
    const a = v < 0 ? -v : v;
    if (a > thr) {
      const sg = v < 0 ? -1 : 1;
      if (runStart < 0 || sg !== runSign) {
        flush();
        runStart = k;
        runSign = sg;
      }
      if (a > bestAbs) {
        bestAbs = a;
        best = k;
      }
    } else if (runStart >= 0) flush();
  }
  flush();
  return { candidates, thr };
}

/** Drop side lobes: a step gives −½ of its height at ±w on the same scale, and the level across it moves against F. */
function dropSideLobes(candidates: Candidate[], P: Float64Array, thrOf: Map<number, number>, rhoMin: number): Candidate[] {
  const n = P.length - 1;
  const mean = (a: number, b: number) => (P[b] - P[a]) / (b - a);
  const byScale = new Map<number, Candidate[]>();
  for (const c of candidates) {
    const list = byScale.get(c.w) ?? [];
    list.push(c);
    byScale.set(c.w, list);
  }
  const kept: Candidate[] = [];
  for (const [w, list] of byScale) {
    for (const c of list) {
      const lobe = list.some(
        (m) => m !== c && m.sign !== c.sign && Math.abs(m.f) > 1.6 * Math.abs(c.f) && Math.abs(m.i - c.i) <= 2 * w,
      );
      const before = mean(Math.max(0, c.i - 2 * w), Math.max(1, c.i - w));
      const after = mean(Math.min(n - 1, c.i + w), Math.min(n, c.i + 2 * w));
      const net = after - before;
      const against = Math.sign(net) === -c.sign && Math.abs(net) > (thrOf.get(w) ?? rhoMin);
      if (!lobe && !against) kept.push(c);
    }
  }
  return kept;
}

/** Finer scales first; a coarser detection only adds an event where no finer one lies. */
function resolveScales(kept: Candidate[]): Candidate[] {
  kept.sort((a, b) => a.w - b.w || b.snr - a.snr);
  const accepted: Candidate[] = [];
  for (const c of kept) {
    const clash = accepted.some((a) => Math.abs(a.i - c.i) < 2 * Math.max(a.w, c.w) && (a.sign === c.sign || a.w < c.w));
    if (!clash) accepted.push(c);
  }
  return accepted.sort((a, b) => a.i - b.i);
}

/** Candidate events in the working signal, in time order. */
export function detectEdges(sig: WorkingSignal, kSigma: number, rhoMin: number): Candidate[] {
  const n = sig.u.length;
  const searchLen = n - sig.start;
  const P = prefixSums(sig.u);
  const scales: number[] = [];
  for (let w = sig.w0; 4 * w <= searchLen && scales.length < 7; w *= 3) scales.push(w);
  if (scales.length === 0) scales.push(Math.max(1, Math.floor(searchLen / 4)));
  const candidates: Candidate[] = [];
  const thresholds: number[] = [];
  const Fbuf = new Float64Array(Math.max(1, n));
  for (const w of scales) {
    const r = filterScale(P, Fbuf, w, sig, kSigma, rhoMin);
    if (!r) continue;
    thresholds.push(r.thr);
    candidates.push(...r.candidates);
  }
  const thrOf = new Map(scales.map((w, k) => [w, thresholds[k] ?? rhoMin]));
  return resolveScales(dropSideLobes(candidates, P, thrOf, rhoMin));
}

/**
 * Merge a pair of opposite steps closer than their own width into one blip (a
 * splice, a short section), and same-sign steps closer than a window into one.
 */
export function mergeEdges(measured: Measured[], w0: number, L: Launch): Measured[] {
  const merged: Measured[] = [];
  for (const m of measured) {
    const last = merged[merged.length - 1];
    if (
      last &&
      Math.sign(last.height) !== Math.sign(m.height) &&
      m.onsetIdx - last.onsetIdx <
        Math.max(1.5 * Math.max(last.w, m.w), 2 * w0, 1.5 * last.riseSamples, 3 * (L.widthSamples ?? 0)) &&
      Math.abs(last.height + m.height) < 0.75 * Math.abs(last.height)
    ) {
      last.blip = true;
      last.endIdx = m.endIdx;
      continue;
    }
    if (last && Math.sign(last.height) === Math.sign(m.height) && m.onsetIdx - last.onsetIdx < Math.max(last.w, m.w)) {
      last.height += m.height;
      if (last.heightRaw !== undefined || m.heightRaw !== undefined)
        last.heightRaw = (last.heightRaw ?? last.height - m.height) + (m.heightRaw ?? m.height);
      last.endIdx = m.endIdx;
      continue;
    }
    merged.push(m);
  }
  return merged;
}
