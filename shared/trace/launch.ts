/**
 * Launch: where the instrument's own edge or pulse is in the record, its
 * level, rise time and width, and whether the trace is a step or a pulse
 * record.
 *
 * The launch is the first excursion larger than a quarter of the trace's range
 * (0.2–99.8 % percentiles), timed from where it leaves the starting level, with
 * its 10–90 % rise time as in IEEE Std 181-2011 ("Transitions, Pulses, and
 * Related Waveforms"). A ρ trace that does not start near −1 holds no launch
 * edge: its time zero is the reference plane, as in VNA-derived step responses.
 * A launch that falls back below half its height within 15 % of the record (or
 * near a given pulse width) and stays there is a pulse; otherwise a step.
 */
import { percentileOf, sampleMedian, sortedSample } from './stats';
import type { Launch, Mode, TraceRecord } from './steps';

/** Three-point average, computed where needed rather than stored. */
function smoothedAt(y: Float64Array): (i: number) => number {
  const n = y.length;
  return (i) => (i <= 0 || i >= n - 1 ? y[Math.min(n - 1, Math.max(0, i))] : (y[i - 1] + y[i] + y[i + 1]) / 3);
}

interface LaunchEdge {
  ic: number;
  sign: number;
  imax: number;
  i10: number;
  i90: number;
  baseline: number;
  peak: number;
  riseSamples: number;
}

/** Follow the launch edge from its first clear crossing `ic` to its top and back to its foot. */
function traceLaunchEdge(y: Float64Array, ic: number, bStart: number): LaunchEdge {
  const n = y.length;
  const ys = smoothedAt(y);
  const sign = Math.sign(ys(ic) - bStart) || 1;
  let maxDev = sign * (ys(ic) - bStart);
  let imax = ic;
  let iTop = ic;
  for (let i = ic + 1; i < n; i++) {
    const d = sign * (ys(i) - bStart);
    if (d > maxDev) {
      // Only a clear rise counts as still climbing; a lossy line's slow creep does not.
      if (d > 1.02 * maxDev) iTop = i;
      maxDev = d;
      imax = i;
    }
    if (d < 0.75 * maxDev) break;
    if (i - iTop > Math.max(20, 6 * (iTop - ic + 1))) break;
  }
  imax = Math.min(imax, iTop);
  // Start of the edge: walk back to where it left the starting level.
  let i10 = ic;
  while (i10 > 0 && sign * (ys(i10) - bStart) > 0.1 * maxDev) i10--;
  const preEnd = Math.max(0, i10 - 2);
  const baseline = preEnd >= 1 ? sampleMedian(y, Math.max(0, preEnd - 2000), preEnd) : bStart;
  const peak = sign * (ys(imax) - baseline);
  let i90 = i10;
  while (i90 < imax && sign * (ys(i90) - baseline) < 0.9 * peak) i90++;
  return { ic, sign, imax, i10, i90, baseline, peak, riseSamples: Math.max(1, i90 - i10) };
}

/** Pulse or step: does the launch fall back below half its height soon, and stay down? */
function launchFall(y: Float64Array, e: LaunchEdge, pulseHintSamples: number | null): { iFall: number; looksPulse: boolean } {
  const n = y.length;
  const ys = smoothedAt(y);
  const { sign, baseline, peak, riseSamples, ic } = e;
  let iFall = -1;
  for (let i = e.imax; i < n; i++) {
    if (sign * (ys(i) - baseline) < 0.5 * peak) {
      iFall = i;
      break;
    }
  }
  let stays = false;
  if (iFall > 0) {
    const width = iFall - ic;
    const end = Math.min(n, iFall + Math.max(width, 4 * riseSamples));
    stays = true;
    for (let i = iFall + riseSamples * 2; i < end; i++) {
      if (sign * (ys(i) - baseline) > 0.5 * peak) {
        stays = false;
        break;
      }
    }
  }
  const widthSamples = iFall > 0 ? iFall - ic : 0;
  const looksPulse =
    iFall > 0 &&
    stays &&
    (pulseHintSamples !== null ? widthSamples < 3 * pulseHintSamples + 4 * riseSamples : widthSamples < 0.15 * (n - ic));
  return { iFall, looksPulse };
}

/** Incident level (step) or peak (pulse), and the first sample past the launch's settling. */
function launchLevels(y: Float64Array, e: LaunchEdge, mode: Mode, iFall: number): { height: number; settleIdx: number } {
  const n = y.length;
  const ys = smoothedAt(y);
  const { baseline, peak, riseSamples, i90 } = e;
  if (mode === 'pulse') {
    // The blind zone ends where the launch pulse is back near the baseline.
    let k = Math.max(e.imax, iFall > 0 ? iFall : e.imax);
    const tail = 0.02 * peak;
    while (k < n - 1 && Math.abs(ys(k) - baseline) > tail) k++;
    return { height: peak, settleIdx: Math.min(n - 1, k + riseSamples) };
  }
  const from = Math.min(n - 1, i90 + riseSamples);
  const to = Math.min(n, from + Math.max(5, 2 * riseSamples));
  let height = sampleMedian(y, from, to) - baseline;
  if (!Number.isFinite(height) || height === 0) height = e.sign * peak;
  return { height, settleIdx: Math.min(n - 1, i90 + 2 * riseSamples) };
}

export function findLaunch(rec: TraceRecord, modeOpt: 'auto' | Mode, pulseHintSamples: number | null): Launch {
  const { y, t, dt, n, unit } = rec;
  const ys = smoothedAt(y);
  const sorted = sortedSample(y);
  const lo = percentileOf(sorted, 0.002);
  const hi = percentileOf(sorted, 0.998);
  const range = Math.max(hi - lo, 1e-300);
  const bStart = sampleMedian(y, 0, Math.min(n, 5));
  // Fractional index of time zero; negative when the record starts after it.
  const zeroIdx = -t[0] / dt;
  const noLaunch = (baseline: number, height: number): Launch => ({
    found: false,
    settleIdx: Math.min(n - 1, Math.max(0, Math.ceil(zeroIdx))),
    idx: Math.min(n - 1, Math.max(0, Math.round(zeroIdx))),
    sign: 1,
    baseline,
    height,
    mode: modeOpt === 'pulse' ? 'pulse' : 'step',
    modeDetected: modeOpt === 'auto',
    riseSamples: 0,
    widthSamples: null,
    zeroIdx,
  });
  if (unit === 'rho' && Math.abs(bStart + 1) > 0.35) {
    // ρ with no launch edge: time zero is the reference plane.
    const from = Math.min(n - 5, Math.max(0, Math.ceil(zeroIdx)));
    const base = sampleMedian(y, from, Math.min(n, from + Math.max(5, Math.min(200, Math.floor(n / 100)))));
    return noLaunch(Number.isFinite(base) ? base : 0, 1);
  }
  if (unit === 'V' && Math.abs(bStart) > 0.35 * range && Math.sign(bStart) === Math.sign(hi + lo)) {
    // The record begins after the launch, at the incident level.
    return noLaunch(0, bStart);
  }
  let ic = -1;
  for (let i = 0; i < n; i++) {
    if (Math.abs(ys(i) - bStart) > 0.25 * range) {
      ic = i;
      break;
    }
  }
  if (ic < 0) return noLaunch(bStart, unit === 'rho' ? 1 : range || 1);
  const edge = traceLaunchEdge(y, ic, bStart);
  const { iFall, looksPulse } = launchFall(y, edge, pulseHintSamples);
  const mode: Mode = modeOpt === 'auto' ? (looksPulse ? 'pulse' : 'step') : modeOpt;
  const { height, settleIdx } = launchLevels(y, edge, mode, iFall);
  return {
    found: true,
    settleIdx,
    idx: edge.i10,
    sign: edge.sign,
    baseline: edge.baseline,
    height,
    mode,
    modeDetected: modeOpt === 'auto',
    riseSamples: edge.riseSamples,
    widthSamples: mode === 'pulse' && iFall > 0 ? iFall - ic : null,
    zeroIdx,
  };
}
