/**
 * Display gains for the trace chart. Neither changes a reading: the engine's
 * distances and reflection coefficients come from the recorded samples.
 *
 * Distance gain undoes the cable's loss on the way out and back, so a far
 * echo is drawn about as tall as it left the fault: a cable losing α dB per
 * 100 m one way loses 2·d·α/100 dB to a reflection at d metres, an amplitude
 * factor of 10^(2·d·α/100/20) (the definition of the decibel for amplitudes).
 */
export function distanceGain(distanceM: number, dbPer100m: number, maxDb = MAX_DISTANCE_GAIN_DB): number {
  if (!(distanceM > 0) || !(dbPer100m > 0)) return 1;
  return 10 ** (Math.min(maxDb, (2 * distanceM * dbPer100m) / 100) / 20);
}

/**
 * The most the distance gain lifts anything: 30 dB (×31.6). Past that the
 * noise it lifts with the echo fills the screen (common practice: display
 * gains of instruments stop at a few tens of dB).
 */
export const MAX_DISTANCE_GAIN_DB = 30;

export interface ChartPoint {
  x: number;
  y: number;
}

/**
 * Pulse traces sit on a flat baseline: each sample's height above it is
 * multiplied by the gain at its distance.
 */
export function pulseWithGain(points: readonly ChartPoint[], gainAt: (x: number) => number, baseline: number): ChartPoint[] {
  return points.map((p) => ({ x: p.x, y: baseline + (p.y - baseline) * gainAt(p.x) }));
}

/**
 * Step traces keep each level after an edge, so multiplying the level would
 * tilt every flat stretch. Instead each change from one sample to the next is
 * multiplied by the gain where it happens: an edge at distance d grows by
 * g(d), flat stretches stay flat. `carried` is the extra height accumulated
 * before the first point (from `stepGainCarry` on a coarser view of the same
 * trace), so a zoomed window lines up with the whole trace.
 */
export function stepWithGain(points: readonly ChartPoint[], gainAt: (x: number) => number, carried = 0): ChartPoint[] {
  const out: ChartPoint[] = [];
  let extra = carried;
  for (let i = 0; i < points.length; i++) {
    if (i > 0) extra += (points[i].y - points[i - 1].y) * (gainAt(points[i].x) - 1);
    out.push({ x: points[i].x, y: points[i].y + extra });
  }
  return out;
}

/** The extra height `stepWithGain` has accumulated by x, read off a (coarser) copy of the trace. */
export function stepGainCarry(points: readonly ChartPoint[], gainAt: (x: number) => number, x: number): number {
  let extra = 0;
  for (let i = 1; i < points.length && points[i].x <= x; i++) extra += (points[i].y - points[i - 1].y) * (gainAt(points[i].x) - 1);
  return extra;
}

/**
 * Vertical gain: the y range shrunk by `gain` around `centre`. At gain 1 the
 * whole trace shows with 5 % room above and below.
 */
export function verticalRange(ys: readonly number[], gain: number, centre?: number): { min: number; max: number } {
  let lo = Infinity;
  let hi = -Infinity;
  for (const y of ys) {
    if (y < lo) lo = y;
    if (y > hi) hi = y;
  }
  if (!Number.isFinite(lo)) return { min: -1, max: 1 };
  const span = Math.max(hi - lo, 1e-9) * 1.1;
  const mid = gain <= 1 || centre === undefined ? (lo + hi) / 2 : centre;
  const half = span / Math.max(1, gain) / 2;
  return { min: mid - half, max: mid + half };
}

/** The middle value of a list (the average of the two middle ones for an even count). */
export function median(values: readonly number[]): number {
  if (!values.length) return 0;
  const s = [...values].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

/**
 * The frequency that carries most of a trace's echo, to read the cable's
 * attenuation at: about 1/(2·width) for a pulse, 0.35/(rise time) for a step
 * edge (the usual rise-time–bandwidth rule); both common practice.
 */
export function echoFrequencyHz(mode: 'step' | 'pulse', pulseWidthNs: number | null, riseTimeNs: number | null): number | null {
  if (mode === 'pulse' && pulseWidthNs && pulseWidthNs > 0) return 1 / (2 * pulseWidthNs * 1e-9);
  if (riseTimeNs && riseTimeNs > 0) return 0.35 / (riseTimeNs * 1e-9);
  return null;
}

/**
 * Attenuation at a frequency from the library's points: straight lines on
 * log–log axes between points, and √f beyond the outermost ones (skin loss,
 * which dominates most cables at TDR frequencies; common practice).
 */
export function attenuationAt(points: ReadonlyArray<{ frequencyMhz: number; dbPer100m: number }>, frequencyHz: number): number | null {
  const pts = points.filter((p) => p.frequencyMhz > 0 && p.dbPer100m > 0).sort((a, b) => a.frequencyMhz - b.frequencyMhz);
  if (!pts.length || !(frequencyHz > 0)) return null;
  const f = frequencyHz / 1e6;
  if (f <= pts[0].frequencyMhz) return pts[0].dbPer100m * Math.sqrt(f / pts[0].frequencyMhz);
  const last = pts[pts.length - 1];
  if (f >= last.frequencyMhz) return last.dbPer100m * Math.sqrt(f / last.frequencyMhz);
  const k = pts.findIndex((p) => p.frequencyMhz >= f);
  const a = pts[k - 1];
  const b = pts[k];
  const t = Math.log(f / a.frequencyMhz) / Math.log(b.frequencyMhz / a.frequencyMhz);
  return Math.exp(Math.log(a.dbPer100m) + t * Math.log(b.dbPer100m / a.dbPer100m));
}
