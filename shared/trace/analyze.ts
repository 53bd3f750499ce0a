/**
 * Reflection-event analysis of a TDR trace: a pipeline of steps, each in its
 * own module with the method it follows named in its header.
 *
 *  1. Noise (noise.ts): robust σ of the record.
 *  2. Launch and mode (launch.ts): the instrument's edge or pulse, step or pulse record.
 *  3. Working signal (signal.ts): the trace in units of ρ; with the cable's loss known,
 *     less the creep the launch leaves on a line with series loss (creep.ts).
 *  4. Detection (detection.ts): multi-scale step filter against a noise threshold.
 *  5. Edge fit (edge-fit.ts): arrival time and height of each event.
 *  6. Location (locate.ts): round trip from the launch, distance d = VF·c·t/2.
 *  7. Uncertainty (uncertainty.ts): the window each event is expected in.
 *  8. Classification (classify.ts): open, short, impedance rise or drop.
 *  9. Echoes (echoes.ts): multiples and bounces, the cable's end.
 */
import { distanceFromRoundTrip, SPEED_OF_LIGHT_M_PER_S } from '../cable/propagation';
import type { ReflectionEvent, TraceAnalysis, TraceWarning } from '../schemas/trace-analysis';
import { checkTimeAxisBounds } from './bounds';
import { pulseCreepRemoved, removeIncidentCreep } from './creep';
import { classifyEvent, impedanceOf, ownReflections, SHORT_MAX_RHO } from './classify';
import { detectEdges, dropClutter, dropQuantiserStairs, FALSE_EVENTS_PER_TRACE, mergeEdges } from './detection';
import { findEchoes, resolveCableEnd } from './echoes';
import { fitEdges, fitLineEdges, lossSummary, pathLossDb } from './edge-fit';
import { TraceInputError } from './errors';
import { lossModelThroughLine } from './loss';
import { findLaunch } from './launch';
import { referencePlaneShift, roundTripSamples, type Timebase, zeroIndex } from './locate';
import { estimateNoise, estimateSlowNoise } from './noise';
import { launchOnsetTimer } from './onset';
import type { ParsedTrace } from './parse';
import { buildWorkingSignal } from './signal';
import { percentileOf, sampleMedian, sortedSample } from './stats';
import type { Candidate, Launch, Measured, TraceRecord } from './steps';
import { budgetView, COVERAGE_FACTOR, uncertaintyBudget, WINDOW_COVERAGE } from './uncertainty';
import { ENGINE_VERSION } from './version';

export interface AnalyzeOptions {
  /** Velocity factor of the cable under test (0 < vf ≤ 1). */
  vf: number;
  /** Relative tolerance of that velocity factor; default 0.02 (±2 %). */
  vfTolerance?: number;
  /** Characteristic impedance, for the impedance estimate of step events. */
  z0Ohm?: number;
  mode?: 'auto' | 'step' | 'pulse';
  /** Time on the trace's axis to take as zero, replacing the detected launch. */
  zeroOffsetNs?: number;
  /** Length of test lead before the cable; subtracted from every distance. */
  leadLengthM?: number;
  /** Launch pulse width, if known; helps tell a pulse from a step. */
  pulseWidthNs?: number;
  /** Detection threshold in noise standard deviations; default: set for 1 false event from noise in 100 traces. */
  thresholdSigma?: number;
  /** Smallest |ρ| reported; default 0.005. */
  minReflection?: number;
  /** The cable's attenuation where known: dB per 100 m at stated frequencies (for the loss-aware edge fit). */
  loss?: Array<{ dbPer100m: number; frequencyHz: number }>;
  /** The pulse width `vf` was measured at (the library's VF for this pulse width), so it holds the line's dispersion. */
  vfPulseWidthNs?: number;
}

function validateOptions(o: AnalyzeOptions): void {
  const bad = (field: string, msg: string) => {
    throw new TraceInputError('BAD_OPTION', `${field} ${msg}`, { field });
  };
  if (!(Number.isFinite(o.vf) && o.vf > 0 && o.vf <= 1)) bad('vf', 'must be a velocity factor between 0 and 1');
  if (o.vfTolerance !== undefined && !(o.vfTolerance >= 0 && o.vfTolerance < 0.5))
    bad('vfTolerance', 'must be a fraction between 0 and 0.5');
  if (o.z0Ohm !== undefined && !(Number.isFinite(o.z0Ohm) && o.z0Ohm > 0)) bad('z0Ohm', 'must be a positive impedance in ohms');
  if (o.mode !== undefined && !['auto', 'step', 'pulse'].includes(o.mode)) bad('mode', "must be 'auto', 'step' or 'pulse'");
  if (o.zeroOffsetNs !== undefined && !Number.isFinite(o.zeroOffsetNs)) bad('zeroOffsetNs', 'must be a number of nanoseconds');
  if (o.leadLengthM !== undefined && !(Number.isFinite(o.leadLengthM) && o.leadLengthM >= 0))
    bad('leadLengthM', 'must be a length of 0 m or more');
  if (o.pulseWidthNs !== undefined && !(Number.isFinite(o.pulseWidthNs) && o.pulseWidthNs > 0))
    bad('pulseWidthNs', 'must be a positive number of nanoseconds');
  if (o.vfPulseWidthNs !== undefined && !(Number.isFinite(o.vfPulseWidthNs) && o.vfPulseWidthNs > 0))
    bad('vfPulseWidthNs', 'must be a positive number of nanoseconds');
  if (o.loss !== undefined) {
    if (!Array.isArray(o.loss)) bad('loss', 'must be a list of attenuations');
    o.loss.forEach((l, k) => {
      if (!(Number.isFinite(l?.dbPer100m) && l.dbPer100m >= 0)) bad(`loss[${k}].dbPer100m`, 'must be 0 dB per 100 m or more');
      if (!(Number.isFinite(l?.frequencyHz) && l.frequencyHz > 0))
        bad(`loss[${k}].frequencyHz`, 'must be a positive frequency in hertz');
    });
  }
}

function recordOf(trace: ParsedTrace): TraceRecord {
  const y = trace.amplitude;
  const t = trace.timeS;
  const n = y.length;
  if (n < 16) throw new TraceInputError('TOO_FEW_SAMPLES', `only ${n} samples; at least 16 are needed`);
  return { y, t, n, dt: (t[n - 1] - t[0]) / (n - 1), unit: trace.amplitudeUnit };
}

/** The analysis with no events: the record's facts and the given warnings. */
function emptyAnalysis(
  rec: TraceRecord,
  L: Launch,
  options: AnalyzeOptions,
  sigma0: number,
  warnings: TraceWarning[],
): TraceAnalysis {
  const { t, n, dt } = rec;
  return {
    engineVersion: ENGINE_VERSION,
    mode: L.mode,
    modeDetected: L.modeDetected,
    amplitudeUnit: rec.unit,
    launch: { indexSample: L.idx, timeNs: (t[0] + L.idx * dt) * 1e9, amplitude: L.height, foundInTrace: L.found },
    noiseLevel: sigma0,
    incidentLevel: L.height,
    vf: options.vf,
    vfTolerance: options.vfTolerance ?? 0.02,
    z0Ohm: options.z0Ohm ?? null,
    sampleIntervalNs: dt * 1e9,
    pulseWidthNs: L.widthSamples !== null ? L.widthSamples * dt * 1e9 : null,
    riseTimeNs: L.found ? L.riseSamples * dt * 1e9 : null,
    zeroOffsetNs: options.zeroOffsetNs ?? 0,
    leadLengthM: options.leadLengthM ?? 0,
    blindZoneM: 0,
    rangeM: Math.max(0, distanceFromRoundTrip(t[n - 1] - t[0], options.vf)),
    events: [],
    warnings,
  };
}

/** Distance, window, ρ, type and impedance of each measured edge, in time order. */
function describeEvents(merged: Measured[], tb: Timebase, options: AnalyzeOptions, warnings: TraceWarning[]): ReflectionEvent[] {
  const { rec, launch: L, signal: sig } = tb;
  const vf = options.vf;
  const leadM = options.leadLengthM ?? 0;
  const mPerSample = (vf * SPEED_OF_LIGHT_M_PER_S * rec.dt) / 2;
  // Echoes and the events' own ρ depend on each other: a first pass sizes the reflectors.
  const rtOf = (m: Measured) => m.onsetIdx - zeroIndex(tb, m.fLo);
  const first = findEchoes(merged, rtOf);
  const firstOwn = ownReflections(
    merged,
    first.of.map((s) => s !== null),
    first.sourceRho,
  );
  const echoes = findEchoes(
    merged,
    rtOf,
    firstOwn.map((o) => o.rho),
  );
  if (echoes.sourceRho !== 0) warnings.push(sourceWarning(echoes.sourceRho));
  const isEcho = echoes.of.map((s) => s !== null);
  const own = ownReflections(merged, isEcho, echoes.sourceRho, sig, L.found ? L.riseSamples : sig.w0);
  const events: ReflectionEvent[] = [];
  const eventOf = new Map<number, number>();
  for (const [mi, m] of merged.entries()) {
    const roundTripS = roundTripSamples(tb, m) * rec.dt;
    const distanceM = distanceFromRoundTrip(roundTripS, vf) - leadM;
    if (distanceM <= 0) continue;
    eventOf.set(mi, events.length);
    const echoOf = echoes.of[mi];
    const rho = own[mi].rho;
    const rhoRaw = m.heightRaw ?? m.height;
    const riseS = m.riseSamples * rec.dt;
    const budget = uncertaintyBudget({
      distanceM,
      vf,
      vfTolerance: options.vfTolerance ?? 0.02,
      mPerSample,
      riseS,
      sigmaU: sig.sigmaU,
      rho: rhoRaw,
      fit: m.fit,
      vfAtPulseWidth: options.vfPulseWidthNs !== undefined,
    });
    const uncertaintyM = budget.expandedM;
    // The edge's second arrival, off the instrument's source, would start one round trip after its own.
    const launchSamples = (L.widthSamples ?? 0) + (L.found ? L.riseSamples : sig.w0);
    const sourceUnseen = echoes.sourceRho === 0 && m.onsetIdx + roundTripSamples(tb, m) > rec.n - 1 - launchSamples;
    const type = classifyEvent(m, own[mi], L.found ? L.riseSamples : sig.w0, rec.n - 1, sourceUnseen);
    const amplitude =
      sig.mode === 'step'
        ? rhoRaw * Math.abs(L.found || rec.unit !== 'rho' ? L.height : 1)
        : m.echoPeak * (L.found ? L.height : 1);
    events.push({
      index: events.length,
      roundTripNs: roundTripS * 1e9,
      distanceM,
      uncertaintyM,
      windowStartM: Math.max(0, distanceM - uncertaintyM),
      windowEndM: distanceM + uncertaintyM,
      reflectionCoefficient: rho,
      reflectionCoefficientRaw: rhoRaw,
      lossCorrected: (m.lossCorrected ?? false) && !m.areaUncorrected,
      pathLossDb: pathLossDb(m),
      uncertaintyBudget: budgetView(budget),
      insideBlindZone: L.found && m.onsetIdx < sig.blindIdx,
      impedanceOhm: impedanceOf(sig.mode, options.z0Ohm ?? null, m, type, rho),
      type,
      isCableEnd: false,
      likelyMultipleOf: echoOf !== null ? (eventOf.get(echoOf) ?? null) : null,
      amplitude,
      snr: Number.isFinite(m.snr) ? m.snr : 0,
      riseTimeNs: riseS * 1e9,
    });
    if (L.found && m.onsetIdx < sig.blindIdx) {
      warnings.push({
        code: 'INSIDE_BLIND_ZONE',
        message: `the ${type} at ${distanceM.toFixed(2)} m lies inside the launch's blind zone; it stands out of the launch, but its distance and ρ are less certain`,
      });
    }
    if (sig.mode === 'pulse' && L.found && !m.blip && Math.abs(m.echoPeak) < 0.6 * Math.abs(rhoRaw)) {
      warnings.push({
        code: 'PULSE_LOSS',
        message: `the echo at ${distanceM.toFixed(1)} m is spread by cable loss (peak ${m.echoPeak.toFixed(2)} of the launch); its ρ is taken from the echo's area${
          m.areaUncorrected
            ? ", not corrected for the cable's DC resistance (give the cable's attenuation in the library to correct it), so its size is a lower bound"
            : ''
        }`,
      });
    }
  }
  return events;
}

/**
 * More candidate edges than fitting could use on any real cable: a record of
 * thousands of like features (a repeating pattern, ringing, interference)
 * would otherwise be fitted edge by edge for seconds before the clutter rule
 * drops them. The strongest are fitted, in time order, and the record says so.
 */
export const MAX_FITTED_CANDIDATES = 200;

function strongestCandidates(all: Candidate[], warnings: TraceWarning[]): Candidate[] {
  if (all.length <= MAX_FITTED_CANDIDATES) return all;
  const kept = [...all]
    .sort((a, b) => b.snr - a.snr)
    .slice(0, MAX_FITTED_CANDIDATES)
    .sort((a, b) => a.i - b.i);
  warnings.push({
    code: 'CLUTTER',
    message: `the record holds ${all.length} candidate edges, far more than a cable holds; only the ${MAX_FITTED_CANDIDATES} standing highest above the noise were examined`,
  });
  return kept;
}

/** An event's ρ as read at the instrument, before the corrections for what stands in front of it. */
const rawRho = (e: ReflectionEvent) => e.reflectionCoefficientRaw ?? e.reflectionCoefficient;

/** Index of the first short among the events that are not echoes (ρ read at or below SHORT_MAX_RHO), or −1. */
const firstShortIndex = (events: readonly ReflectionEvent[]) =>
  events.findIndex((e) => e.likelyMultipleOf === null && rawRho(e) <= SHORT_MAX_RHO);

/**
 * The most of its size that an event beyond a drop read at ρ can show at the instrument. A lumped
 * shunt fault passes 1 + ρ each way, (1 − |ρ|)²; a change to a lower-impedance line passes 1 + ρ out
 * and 1 − ρ back, 1 − ρ², which is the larger (Pozar §2.3, eq. 2.35 at each junction). The record
 * cannot tell the two apart at the edge, so the larger bounds what a step record can show.
 */
export const seenBeyond = (rho: number) => 1 - Math.min(1, rho * rho);

/**
 * A step reading no line can give: a total reflection (a short, ρ ≤ −0.8 read at the instrument)
 * followed by a strong event that is no echo. A short returns the whole wave, so what lies beyond it
 * shows at most seenBeyond(ρ) of its size and a step record stays at its level; a record that falls to
 * the baseline and climbs back is a wide pulse. `strong` is in units of the launch.
 */
export function impossibleStepReading(a: TraceAnalysis, strong = 0.3): boolean {
  if (a.mode !== 'step') return false;
  const k = firstShortIndex(a.events);
  if (k < 0) return false;
  const bar = Math.max(strong, seenBeyond(rawRho(a.events[k])));
  return a.events.some((e, j) => j > k && e.likelyMultipleOf === null && Math.abs(rawRho(e)) > bar);
}

/**
 * Smallest edge, in launch heights, taken as the line seen past a short (see lineSeenPastShort): a
 * floor under seenBeyond(ρ) for a short read a little under its size (from memory: a step's level is
 * read to a few hundredths of the launch on a lossy line).
 */
const PAST_SHORT_MIN = 0.05;

/**
 * The same test on the events as read, before the weak ones past the cable's end are dropped as its
 * echoes: past a short read at ρ the line shows at most seenBeyond(ρ) of its size, so an
 * edge clear of the short's own timing (two of its uncertainties) that is no echo and stands larger
 * than that is no step record's, however small beside the launch.
 */
function lineSeenPastShort(events: readonly ReflectionEvent[]): boolean {
  const k = firstShortIndex(events);
  if (k < 0) return false;
  const short = events[k];
  const beyond = seenBeyond(rawRho(short));
  return events.some(
    (e, j) =>
      j > k &&
      e.likelyMultipleOf === null &&
      e.distanceM > short.distanceM + 2 * short.uncertaintyM &&
      Math.abs(rawRho(e)) > Math.max(PAST_SHORT_MIN, beyond),
  );
}

/**
 * A drop read as a short (ρ ≤ SHORT_MAX_RHO) with an edge beyond it, clear of its timing and no echo,
 * larger than a lumped shunt fault could pass ((1 − |ρ|)², with the PAST_SHORT_MIN floor) but within
 * what a change of line passes (seenBeyond): the line goes on past it at a much lower impedance, so it
 * is an impedance drop, not a short. Run on a step reading that is kept as one.
 */
function retypeDropsWithLineBeyond(events: ReflectionEvent[], z0: number | null, warnings: TraceWarning[]): void {
  for (const [k, drop] of events.entries()) {
    if (drop.type !== 'short' || drop.likelyMultipleOf !== null) continue;
    const lumped = Math.max(PAST_SHORT_MIN, (1 - Math.min(1, Math.abs(rawRho(drop)))) ** 2);
    const beyond = events.find(
      (e, j) =>
        j > k &&
        e.likelyMultipleOf === null &&
        e.distanceM > drop.distanceM + 2 * drop.uncertaintyM &&
        Math.abs(rawRho(e)) > lumped,
    );
    if (beyond === undefined) continue;
    const rho = drop.reflectionCoefficient;
    drop.type = 'impedance-drop';
    drop.isCableEnd = false;
    drop.impedanceOhm = z0 !== null && rho > -1 ? (z0 * (1 + rho)) / (1 - rho) : null;
    warnings.push({
      code: 'LINE_PAST_DROP',
      message: `the drop at ${drop.distanceM.toFixed(2)} m is read as a change to a much lower impedance, not a short: the line shows beyond it (the ${beyond.type} at ${beyond.distanceM.toFixed(2)} m), more than a short could pass`,
    });
  }
}

/**
 * Smallest sink, in launch heights, of a step record past a short below both its pre-launch level and
 * the level it held just past the short, taken as no step record's: past a short at −1 the level sits
 * on the pre-launch level (1 + ρ of the step), and what lies beyond shows at most (1 − |ρ|)² of its
 * size (Pozar §2.3). A source that does not match the line sends the short's reflection back, but
 * each trip is smaller, so the level moves back towards the pre-launch level, never further from it.
 * The floor allows for a lossy line's slow creep after the short's edge (from memory: a few hundredths
 * of the launch).
 */
const SINK_PAST_SHORT_MIN = 0.05;

/**
 * A step reading whose record, past its first short, sinks over one of eight stretches below both its
 * pre-launch level (measured before the launch's edge in the record) and the level just past the
 * short: the negative echo of a wide launch pulse, read past a short that no cable can show. Each
 * stretch's median is held against SINK_PAST_SHORT_MIN of the launch and five of its own noise
 * deviations. `shortEnd`: the sample where the first short's edge has settled, or null.
 */
function sinksPastShort(rec: TraceRecord, L: Launch, sigma0: number, shortEnd: number | null): boolean {
  if (L.mode !== 'step' || !L.found || !L.onsetInRecord || shortEnd === null) return false;
  const from = Math.max(0, Math.min(rec.n, Math.ceil(shortEnd)));
  const len = Math.floor((rec.n - from) / 8);
  if (len < 16) return false;
  const sign = Math.sign(L.height) || 1;
  const margin = Math.max(SINK_PAST_SHORT_MIN * Math.abs(L.height), (5 * sigma0) / Math.sqrt(len));
  const level = (k: number) => sign * (sampleMedian(rec.y, from + k * len, from + (k + 1) * len) - L.baseline);
  const after = Math.min(0, level(0));
  for (let k = 1; k < 8; k++) if (level(k) < after - margin) return true;
  return false;
}

/**
 * Shortest launch, as a share of the record from the launch on, that a pulse reading returning
 * nothing at all gives up for a step into a short. An instrument's pulse is set short against its
 * range, so that the line's echoes can be told apart from it; a launch filling over a quarter of the
 * record after it, with nothing coming back in the rest, is as well read as a step whose wave came
 * back whole from a short at its fall. Of the two readings a missed short is the worse mistake.
 */
export const WIDE_LAUNCH_SHARE = 0.25;

/** Analyse a parsed trace. Throws TraceInputError for bad options. */
export function analyzeTrace(trace: ParsedTrace, options: AnalyzeOptions): TraceAnalysis {
  const { analysis: a, launch, n, seenPastShort } = analyzeOnce(trace, options);
  if ((options.mode ?? 'auto') !== 'auto' || !a.modeDetected) return a;
  if (seenPastShort || impossibleStepReading(a)) {
    // Read as a step record, it has a line seen past a short: it is a pulse record whose launch is wide.
    const p = analyzeOnce(trace, { ...options, mode: 'pulse' }).analysis;
    return {
      ...p,
      modeDetected: true,
      warnings: [
        ...p.warnings,
        {
          code: 'MODE_FROM_ECHOES',
          message:
            'read as a pulse record: as a step record it would show the line beyond a short, which no cable can; give the mode if this is wrong',
        },
      ],
    };
  }
  return stepIntoShort(trace, options, a, launch, n) ?? a;
}

/**
 * Does a pulse reading show nothing coming back from the line? Only events inside the launch's blind
 * zone, or none: what lies there stands out of the launch's own settling, and for a "launch" that is
 * a step's wave returned whole by a short, that settling is the level past the short (the source's
 * re-reflection and the line's creep moving it), not an echo of the line.
 */
export function nothingReturned(events: readonly ReflectionEvent[]): boolean {
  return events.every((e) => e.insideBlindZone);
}

/**
 * A wide launch with nothing after it, read as a pulse, is also a step into a short at the launch's
 * fall (ρ ≈ −1 returns the whole wave and hides the line beyond). Without a stated pulse width, and
 * when the launch fills over WIDE_LAUNCH_SHARE of the record after it with nothing returned
 * (nothingReturned), the step reading is given with a warning, provided it holds that short first
 * and nothing a line beyond a short cannot show.
 */
function stepIntoShort(
  trace: ParsedTrace,
  options: AnalyzeOptions,
  a: TraceAnalysis,
  L: Launch,
  n: number,
): TraceAnalysis | null {
  if (a.mode !== 'pulse' || !nothingReturned(a.events) || !L.found || L.widthSamples === null) return null;
  if ((options.pulseWidthNs ?? trace.hints.pulseWidthNs) !== undefined) return null;
  if (L.widthSamples < WIDE_LAUNCH_SHARE * (n - L.idx)) return null;
  const { analysis: s, seenPastShort } = analyzeOnce(trace, { ...options, mode: 'step' });
  const first = s.events[0];
  if (first === undefined || first.type !== 'short') return null;
  if (seenPastShort || impossibleStepReading(s)) return null;
  return {
    ...s,
    modeDetected: true,
    warnings: [
      ...s.warnings,
      {
        code: 'MODE_FROM_ECHOES',
        message: `read as a step record into a short at ${first.distanceM.toFixed(2)} m: read as a pulse record the launch would fill much of the record and nothing would come back from the line; give the mode or the pulse width if this is wrong`,
      },
    ],
  };
}

/** Where the first short among the events (no echo) has settled: its edge's onset plus three of its rise times, or null. */
function shortEnd(events: readonly ReflectionEvent[], merged: readonly Measured[], tb: Timebase): number | null {
  const short = events[firstShortIndex(events)];
  if (short === undefined) return null;
  const dtNs = tb.rec.dt * 1e9;
  const m = merged.find((x) => Math.abs(roundTripSamples(tb, x) * dtNs - short.roundTripNs) < 1e-6 * Math.max(1, dtNs));
  return m === undefined ? null : m.onsetIdx + 3 * Math.max(1, m.riseSamples);
}

/** One reading in the given (or detected) mode, its launch and length, and whether as a step record it shows the line past a short. */
function analyzeOnce(
  trace: ParsedTrace,
  options: AnalyzeOptions,
): { analysis: TraceAnalysis; launch: Launch; n: number; seenPastShort: boolean } {
  validateOptions(options);
  checkTimeAxisBounds(trace);
  const rec = recordOf(trace);
  const warnings: TraceWarning[] = [...trace.warnings];
  const sigma0 = estimateNoise(rec.y);
  const pulseHintNs = options.pulseWidthNs ?? trace.hints.pulseWidthNs;
  const pulseHintSamples = pulseHintNs !== undefined ? (pulseHintNs * 1e-9) / rec.dt : null;
  const L = findLaunch(rec, options.mode ?? 'auto', pulseHintSamples, estimateSlowNoise(rec.y));
  const ySorted = sortedSample(rec.y);
  if (!(percentileOf(ySorted, 0.999) - percentileOf(ySorted, 0.001) > 0) || !(Math.abs(L.height) > 0)) {
    const analysis = emptyAnalysis(rec, L, options, sigma0, [
      ...warnings,
      { code: 'FLAT_TRACE', message: 'the trace is flat' },
      { code: 'NO_REFLECTION', message: 'no reflection above noise' },
    ]);
    return { analysis, launch: L, n: rec.n, seenPastShort: false };
  }
  if (!L.found) warnings.push(noLaunchWarning(rec));
  else if (!L.onsetInRecord) {
    warnings.push({
      code: 'LAUNCH_BEFORE_RECORD',
      message: "the record starts during the launch pulse; time zero is taken from the file's own axis",
    });
  }
  if (L.clipped) {
    warnings.push({
      code: 'LAUNCH_CLIPPED',
      message:
        'the launch is flat at the recorder’s limit (clipped); reflection coefficients read against it are too large and are capped at ±1',
    });
  }
  // One record-length buffer for the temporary running sums of the noise measure and of detection, in turn.
  const scratch = new Float64Array(rec.n + 1);
  // A pulse record's launch leaves the same creep behind it, as a slow tail: taken out of the trace itself.
  const pulseFixed =
    options.loss && options.loss.length > 0
      ? pulseCreepRemoved(rec, L, lossModelThroughLine(options.loss, options.vf), options.vf)
      : null;
  const signal = buildWorkingSignal(pulseFixed ? { ...rec, y: pulseFixed } : rec, L, sigma0, scratch, rec.y);
  if (rec.n - signal.start < 16) {
    const msg = 'no reflection above noise (the record ends inside the blind zone)';
    return {
      analysis: emptyAnalysis(rec, L, options, sigma0, [...warnings, { code: 'NO_REFLECTION', message: msg }]),
      launch: L,
      n: rec.n,
      seenPastShort: false,
    };
  }
  // A known loss tells how the incident step creeps on its own; the reflections are read without it.
  if (options.loss && options.loss.length > 0)
    removeIncidentCreep(rec, L, signal, lossModelThroughLine(options.loss, options.vf), options.vf);
  const rhoMin = options.minReflection ?? 0.005;
  const detection = detectEdges(signal, {
    thresholdSigma: options.thresholdSigma,
    falseEventsPerTrace: FALSE_EVENTS_PER_TRACE,
    rhoMin,
    scratch,
  });
  const edgeInput = {
    rec,
    launch: L,
    signal,
    rhoMin,
    vf: options.vf,
    loss: options.loss,
    vfPulseWidthNs: options.vfPulseWidthNs,
  };
  const candidates = strongestCandidates(detection.candidates, warnings);
  const fitted = dropQuantiserStairs(fitEdges(edgeInput, candidates), signal, L);
  const line = fitLineEdges(edgeInput, mergeEdges(fitted, signal.w0, L));
  const merged = line.events;
  const launchOnset = launchOnsetTimer(L, signal);
  const zeroOverride = options.zeroOffsetNs !== undefined ? (options.zeroOffsetNs * 1e-9 - rec.t[0]) / rec.dt : null;
  const tb: Timebase = { rec, launch: L, signal, launchOnset, zeroOverride, zeroShift: referencePlaneShift(L, merged) };
  const events = describeEvents(merged, tb, options, warnings);
  if (!L.clipped) warnings.push(...dropOverUnity(events));
  warnings.push(...dropUnplaced(events));
  const seenPastShort =
    L.mode === 'step' && (lineSeenPastShort(events) || sinksPastShort(rec, L, sigma0, shortEnd(events, merged, tb)));
  if (L.mode === 'step' && !seenPastShort) retypeDropsWithLineBeyond(events, options.z0Ohm ?? null, warnings);
  warnings.push(...resolveCableEnd(events));
  const clutter = dropClutter(events);
  if (clutter.length > 0) {
    warnings.push(...clutter);
    // The cable's end is found again among what is left.
    for (const e of events) e.isCableEnd = false;
    warnings.push(...resolveCableEnd(events));
  }
  const mPerSample = (options.vf * SPEED_OF_LIGHT_M_PER_S * rec.dt) / 2;
  const blindZoneM = L.found ? Math.max(0, (signal.blindIdx - launchOnset(0.1)) * mPerSample - (options.leadLengthM ?? 0)) : 0;
  if (events.length === 0) warnings.push({ code: 'NO_REFLECTION', message: 'no reflection above noise' });
  if (blindZoneM > 0) {
    warnings.push({
      code: 'BLIND_ZONE',
      message: `the launch hides events closer than ${blindZoneM.toFixed(2)} m; only ones standing well out of it are reported there, with less certain distance and ρ`,
    });
  }
  const analysis: TraceAnalysis = {
    ...emptyAnalysis(rec, L, options, sigma0, warnings),
    blindZoneM,
    events,
    ...lossSummary(line),
    windowCoverage: WINDOW_COVERAGE,
    detection: {
      falseEventsPerTrace: FALSE_EVENTS_PER_TRACE,
      thresholdSigma: detection.thresholdSigma,
      independentTests: Math.round(detection.independentTests),
    },
  };
  return { analysis, launch: L, n: rec.n, seenPastShort };
}

/**
 * A passive line returns at most the wave sent into it: a reflection read at the instrument
 * is at most (1 + ρ_s) of the launch, ≤ 2 for any source up to an open (Pozar §2.3). An edge
 * read larger is the launch's own ringing or a misread scale, not a reflection.
 */
export function dropOverUnity(events: ReflectionEvent[], bound = 2): TraceWarning[] {
  const dropped = dropEvents(events, (e) => Math.abs(rawRho(e)) > bound);
  if (dropped.length === 0) return [];
  return [
    {
      code: 'OVER_UNITY_IGNORED',
      message: `${dropped.length} edge(s) read larger than a passive line can return were ignored as the launch's ringing`,
    },
  ];
}

/** Removes the events `drop` picks, with the echoes marked as theirs, numbers the rest again and returns what went. */
function dropEvents(events: ReflectionEvent[], drop: (e: ReflectionEvent) => boolean): ReflectionEvent[] {
  const dropped = new Set<number>();
  for (const e of events) {
    if (drop(e) || (e.likelyMultipleOf !== null && dropped.has(e.likelyMultipleOf))) dropped.add(e.index);
  }
  if (dropped.size === 0) return [];
  const gone = events.filter((e) => dropped.has(e.index));
  const kept = events.filter((e) => !dropped.has(e.index));
  const renumber = new Map(kept.map((e, k) => [e.index, k]));
  for (const e of kept) {
    e.index = renumber.get(e.index)!;
    if (e.likelyMultipleOf !== null) e.likelyMultipleOf = renumber.get(e.likelyMultipleOf) ?? null;
  }
  events.splice(0, events.length, ...kept);
  return gone;
}

/**
 * An event is placed only when the fit times it (the timing term of its window, at the window's
 * coverage) to better than this fraction of its distance either side, or it stands at least
 * UNPLACED_SNR above the noise. A reflection off a discontinuity is an edge the fit can time; a weak
 * change that the fit can time only to within a fifth of its own distance is a slow change of level
 * (a wander of coloured noise, the foot of a far edge) that no distance can be given for, so it is
 * said, not listed as an event. A far echo spread by loss is timed well and kept, however wide the
 * loss model's share of its window.
 * On the simulated tuning traces (scripts/sim2) no event that had to be found was read both this weak
 * and this spread.
 */
export const UNPLACED_WINDOW_FRACTION = 0.2;
/** The SNR at and above which an event is kept however wide its window (see UNPLACED_WINDOW_FRACTION). */
export const UNPLACED_SNR = 10;

/**
 * Drops the events too weak and too spread to place (UNPLACED_WINDOW_FRACTION), with any echo
 * marked as theirs, and says where each lay.
 */
export function dropUnplaced(events: ReflectionEvent[]): TraceWarning[] {
  const unplaced = (e: ReflectionEvent) =>
    e.snr < UNPLACED_SNR && COVERAGE_FACTOR * (e.uncertaintyBudget?.timingM ?? 0) > UNPLACED_WINDOW_FRACTION * e.distanceM;
  return dropEvents(events, unplaced)
    .filter(unplaced)
    .map((e) => ({
      code: 'UNPLACED_CHANGE',
      message: `a weak, slow change of level near ${e.distanceM.toFixed(1)} m (timed to ± ${(COVERAGE_FACTOR * (e.uncertaintyBudget?.timingM ?? 0)).toFixed(1)} m, ${e.snr.toFixed(1)} times the noise) is too spread to place; it is not listed as an event`,
    }));
}

function noLaunchWarning(rec: TraceRecord): TraceWarning {
  return {
    code: 'NO_LAUNCH_EDGE',
    message:
      rec.unit === 'rho'
        ? 'no launch edge in the trace; time zero is taken as the reference plane'
        : 'the record starts after the launch; time zero is taken as the launch',
  };
}

function sourceWarning(rhoS: number): TraceWarning {
  return {
    code: 'SOURCE_MISMATCH',
    message: `the instrument's source reflects returning waves (ρ ≈ ${rhoS.toFixed(2)}, from the echo at twice the strongest round trip); reflection coefficients are corrected for it and its echoes are marked`,
  };
}
