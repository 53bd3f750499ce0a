/**
 * The values the engine's steps hand to one another. Each step lives in its own
 * module (launch, signal, detection, edge-fit, locate, classify, echoes,
 * uncertainty); `analyzeTrace` in analyze.ts calls them in order.
 */

import type { LineFit } from './edge-fit';

export type Mode = 'step' | 'pulse';

/** The record as the steps see it: uniform samples y at times t. */
export interface TraceRecord {
  y: Float64Array;
  t: Float64Array;
  n: number;
  /** Sample interval, seconds. */
  dt: number;
  unit: 'V' | 'rho';
}

export interface Launch {
  found: boolean;
  /** Index of the first sample past the launch's settling (search starts here). */
  settleIdx: number;
  /** Index near the launch edge (or zero reference). */
  idx: number;
  sign: number;
  baseline: number;
  /** Step: incident level above baseline; pulse: peak height. */
  height: number;
  mode: Mode;
  modeDetected: boolean;
  riseSamples: number;
  widthSamples: number | null;
  /** Index of time zero on the trace's own axis (fractional). */
  zeroIdx: number;
  /**
   * False when the launch's leading edge is not in the record (the record starts during
   * the launch): time zero is then the axis zero, as for a reference-plane trace.
   */
  onsetInRecord: boolean;
  /** The launch reaches the recorder's limit: a flat top at the record's extreme. */
  clipped: boolean;
  /**
   * Clipped while its edge is still steep, so the record's launch is no model of the wave sent. A
   * launch that meets the limit only as its edge flattens (a run of equal samples at the top) is
   * clipped but still shaped as sent, bar its top.
   */
  clippedOnEdge: boolean;
  /**
   * A pulse launch that began before the record and fills much of it: the middle of the stretch just
   * past it where the record was seen resting on `baseline`, the level the pulse reading's baseline
   * passes through (its echoes may rest longer elsewhere). Absent for every other launch.
   */
  restAt?: number;
}

/**
 * Working signal u: step traces normalised so a matched line reads 0, an open
 * +1 and a short −1; pulse traces integrated and divided by the launch area, so
 * every echo becomes a step whose height is its reflection coefficient.
 */
export interface WorkingSignal {
  mode: Mode;
  u: Float64Array;
  /** u after the short timing boxcar (width smoothW). */
  us: Float64Array;
  /** Pulse mode: the baseline-free trace in units of the launch peak; empty for steps. */
  pulseRaw: Float64Array;
  /**
   * Pulse mode: the launch as recorded (pulseRaw from its foot to where it has settled), the template
   * the echoes are matched against; null where the record holds no whole, unclipped launch.
   */
  pulseTemplate: Float64Array | null;
  unitArea: number;
  /** Noise of u per sample (step mode). */
  sigmaU: number;
  /** Noise of one pulse-domain sample in u units (pulse mode). */
  scaleForPulse: number;
  /** Shortest filter scale, samples. */
  w0: number;
  smoothW: number;
  /** First sample searched for events (may lie inside the blind zone). */
  start: number;
  /** End of the blind zone, samples: before it only events standing well out of the launch are kept. */
  blindIdx: number;
  /**
   * Pulse records: up to this scale (twice the launch's width) a short cable's record is mostly launch and
   * echoes, and the noise at a scale is read past them (clippedMadSigma); 0 for step records.
   */
  clipNoiseUpTo: number;
  /** Coloured-noise factor at a scale of w samples (noise.ts). */
  noiseExcess: (w: number) => number;
  /** Step records: stretches held at the recorder's limit, [start, end) pairs (noise.ts), or null when none are. */
  held: Int32Array | null;
  /**
   * Step records: the recorder's quantiser step in units of ρ (0 where none shows). A slow
   * creep crosses it as a clean one-step stair, so no event is read from a step that small.
   */
  quantU: number;
  /**
   * Pulse records: the recorder's quantiser step in launch peaks (pulseRaw's units), where the noise is
   * below half of it (0 elsewhere). A run of one level up or down is then no evidence of an echo.
   */
  quantRaw: number;
}

/** A detection: the step filter's extreme at scale w. */
export interface Candidate {
  i: number;
  w: number;
  sign: number;
  f: number;
  snr: number;
  /** Found by the pulse matched filter, whose window lies wholly past the launch's settling. */
  matched?: boolean;
}

/** A detection after its edge has been timed and its height measured. */
export interface Measured {
  onsetIdx: number;
  t50Idx: number;
  riseSamples: number;
  /**
   * Step height in ρ at the instrument: the line's own ρ times the transmission of
   * everything in front of it. Corrected for the cable's loss when `lossCorrected`.
   */
  height: number;
  /** The height as read from the trace, before any loss correction (default: `height`). */
  heightRaw?: number;
  /** True when the edge fit modelled the cable's loss and `height` is corrected for it. */
  lossCorrected?: boolean;
  /**
   * A pulse echo's ρ (read from its area) that the loss model could not correct: the model was
   * estimated from the edges' shape, which carries no DC-resistance term, and only that term lowers
   * the area. The ρ is then a lower bound on its size, and the event is reported as not corrected.
   */
  areaUncorrected?: boolean;
  peakDev: number;
  blip: boolean;
  snr: number;
  w: number;
  endIdx: number;
  fLo: number;
  /** Largest |deviation| of the raw pulse-domain echo, for the loss warning. */
  echoPeak: number;
  /** u just before the event (step: 0 on a clean matched line). */
  levelBefore: number;
  /** Change over the last level window, as a fraction of the event: > 0 while a lossy edge is still settling. */
  stillMoving: number;
  /** The line fit's delay, its uncertainty and the loss model it used (edge-fit.ts); absent where the reading stands. */
  fit?: LineFit;
}
