/**
 * Edge timing by the tangent construction: the line through an edge's low
 * (fLo, 10–30 %) and 50 % points, extended back to the baseline, gives the
 * time the edge leaves it (the cursor construction used to read TDR traces,
 * e.g. Agilent Application Note 1304-2, "Time Domain Reflectometry Theory",
 * 2006). The launch is timed the same way, on the same signal, so a lossless
 * reflection's round trip is exact. For a skin-effect-limited edge,
 * v(t) = erfc(a / 2√t) (R. L. Wigington and N. S. Nahman, "Transient analysis
 * of coaxial cables considering skin effect", Proc. IRE 45 (1957) 166), the
 * construction lands 0.04·a² before the true delay while the 50 % point lands
 * 1.1·a² after it, so the residual bias from loss is small.
 */
import { lineFit } from './stats';
import type { Launch, WorkingSignal } from './steps';

export interface Onset {
  onset: number;
  t50: number;
  rise: number;
}

/**
 * Onset of an edge in u between `base(i)` and base + h: the line through the
 * fLo and 50 % crossings, extended back to the baseline.
 */
export function measureOnset(
  u: Float64Array,
  iRef: number,
  base: (i: number) => number,
  h: number,
  fLo: number,
  iMin: number,
  iMax: number,
): Onset {
  const frac = (i: number) => (u[i] - base(i)) / h;
  let j = Math.min(iMax, Math.max(iMin, iRef));
  // Move forward to the 50 % level if needed.
  while (j < iMax && frac(j) < 0.5) j++;
  while (j > iMin && frac(j - 1) >= 0.5) j--;
  let t50 = j;
  if (j > iMin) {
    const a = frac(j - 1);
    const b = frac(j);
    t50 = j - 1 + (b !== a ? (0.5 - a) / (b - a) : 0.5);
  }
  let k = Math.max(iMin, j - 1);
  while (k > iMin && frac(k) >= fLo) k--;
  let tLo = k;
  if (k + 1 <= j) {
    const a = frac(k);
    const b = frac(k + 1);
    tLo = k + (b !== a ? Math.min(1, Math.max(0, (fLo - a) / (b - a))) : 0);
  }
  const onset = tLo - ((t50 - tLo) * fLo) / (0.5 - fLo);
  let m = j;
  while (m < iMax && frac(m) < 0.9) m++;
  return { onset, t50, rise: Math.max(0, m - tLo) * (0.8 / (0.9 - fLo)) };
}

/**
 * Launch onset for a given fLo, on the same signal and with the same
 * construction as the events (cached per fLo).
 */
export function launchOnsetTimer(L: Launch, sig: WorkingSignal): (fLo: number) => number {
  const cache = new Map<number, number>();
  const { us, mode } = sig;
  const n = us.length;
  return (fLo) => {
    if (!L.found || !L.onsetInRecord) return L.zeroIdx;
    const cached = cache.get(fLo);
    if (cached !== undefined) return cached;
    const preEnd = Math.max(1, L.idx - 1);
    const preStart = Math.max(0, preEnd - Math.max(8, 4 * L.riseSamples));
    const base = lineFit(us, preStart, preEnd);
    const flat = (_i: number) => base(preEnd - 1);
    let h: number;
    let iRef: number;
    if (mode === 'step') {
      h = -flat(0);
      iRef = Math.min(n - 1, L.idx + 2 * L.riseSamples);
    } else {
      h = us[Math.min(n - 1, L.settleIdx)] - flat(0);
      iRef = Math.min(n - 1, L.settleIdx);
    }
    const r = measureOnset(us, iRef, flat, h, fLo, Math.max(0, preStart), Math.min(n - 1, iRef + L.riseSamples));
    // A launch at the record's very first samples leaves no baseline to measure its onset from: time from the launch's own zero.
    const onset = Number.isFinite(r.onset) ? r.onset : L.zeroIdx;
    cache.set(fLo, onset);
    return onset;
  };
}
