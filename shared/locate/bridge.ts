/**
 * Resistance-bridge loop methods for a resistive fault (to earth or between
 * conductors): the faulty conductor is looped at the far end to a sound one,
 * and a Wheatstone bridge at the test end compares the two parts of the loop
 * either side of the fault. The fault resistance sits in the battery branch,
 * so it does not move the balance (it only costs sensitivity).
 *
 * Murray loop (ratio arms P on the sound side, Q on the faulty side; R the loop
 * from the sound-side terminal round to the fault, X the faulty conductor from
 * the test end to the fault). Balance: P/Q = R/X, so
 *   X = Q/(P+Q) · (R + X)
 * and for a loop of two equal conductors of route length l, l_x = Q/(P+Q) · 2l.
 * (V. K. Mehta & R. Mehta, Principles of Power System, ch. "Underground
 * cables", Murray loop test; Hawkins Electrical Guide vol. 3 (1914), "The
 * Murray loop", with the loop resistance measured and the good wire unknown.)
 *
 * Varley loop (ratio arms a on the rheostat side, b on the loop side, rheostat
 * S in series with the faulty conductor, loop resistance L = X + Y measured first
 * with the ordinary bridge). Balance: a/b = (S + X)/Y with Y = L − X, so
 *   X = (a·L − b·S)/(a + b)
 * (Hawkins Electrical Guide vol. 3 (1914), "The Varley loop"; with equal arms
 * X = (L − S)/2.)
 *
 * X becomes a distance through the loop's conductors: as a fraction of the
 * loop's resistance, laid over the loop's equivalent length, when the sound
 * conductor is known (then the conductors' absolute resistance and most of the
 * temperature cancel), or as ohms walked along the faulty conductor when it is
 * not.
 */
import {
  conductorOhm,
  distanceAtOhm,
  fromEnd,
  resolveConductor,
  scaleSections,
  temperatureInput,
  type ConductorSection,
  type DataScale,
  type ResolvedSection,
} from './conductors';
import { LocateInputError, finite, nonNegative, positive } from './errors';
import {
  buildEstimate,
  readingU,
  type CableEnd,
  type CableRunInput,
  type LocationEstimate,
  type UncertainInput,
} from './estimate';

/** Default resolution of a bridge's ratio reading (three decimals). */
export const DEFAULT_RATIO_STEP = 0.001;
/** Default resolution of a bridge's resistance readings, Ω. */
export const DEFAULT_OHM_STEP = 0.01;
/** A measured loop that differs from the conductor data by more than this fraction earns a note. */
const LOOP_MISMATCH_NOTE = 0.1;

export interface LoopSetup {
  fromEnd: CableEnd;
  /** The faulty conductor, sections listed from end A, adding up to the installed length. */
  faulty: ConductorSection[];
  /** The sound conductor looped to it at the far end: the same construction (default), its own sections, or unknown. */
  sound?: ConductorSection[] | 'same' | 'unknown';
  /** Conductor temperature, °C (default 20 °C, then with a wide uncertainty). */
  temperatureC?: number;
  /** Standard uncertainty of the conductor temperature, K. */
  temperatureUK?: number;
  label?: string;
}

export interface MurrayReading extends LoopSetup {
  /** Q/(P+Q): the share of the loop's resistance between the test end and the fault, 0–1. */
  ratio?: number;
  /** Or the two ratio arms at balance, Ω. */
  faultySideArmOhm?: number;
  soundSideArmOhm?: number;
  /** Resolution of the ratio reading (default 0.001). */
  ratioStep?: number;
  /** ± accuracy of the ratio reading, as a fraction of the loop (default 0). */
  ratioAccuracy?: number;
  /** Loop resistance measured with the bridge, Ω: needed when the sound conductor is unknown. */
  loopOhm?: number;
  ohmStep?: number;
  /** ± accuracy of the bridge's resistance readings, % of reading. */
  accuracyPct?: number;
}

export interface VarleyReading extends LoopSetup {
  /** a/b: the ratio arm on the rheostat (faulty) side over the arm on the loop (sound) side. */
  armRatio: number;
  /** Rheostat S at balance, Ω. */
  rheostatOhm: number;
  /** Loop resistance X + Y from the first balance, Ω; without it, worked out from the conductor data. */
  loopOhm?: number;
  /** Resolution of the rheostat and loop readings, Ω (default 0.01). */
  ohmStep?: number;
  /** ± accuracy of the bridge's resistance readings, % of reading (one error for both readings). */
  accuracyPct?: number;
}

interface Loop {
  faulty: ResolvedSection[];
  sound: ResolvedSection[] | null;
  temperatureC: number;
  temperatureUK: number;
  dataKeys: Map<string, { label: string; relativeU: number }>;
}

function resolveLoop(run: CableRunInput, s: LoopSetup, field: string): Loop {
  const L = positive('installedLengthM', run.installedLengthM, 'installed length');
  const faulty = resolveConductor(s.faulty, L, `${field}.faulty`);
  const sound =
    s.sound === 'unknown'
      ? null
      : s.sound === undefined || s.sound === 'same'
        ? faulty
        : resolveConductor(s.sound, L, `${field}.sound`);
  const { temperatureC, temperatureUK } = temperatureInput(field, s.temperatureC, s.temperatureUK);
  const dataKeys = new Map<string, { label: string; relativeU: number }>();
  for (const sec of [...faulty, ...(sound ?? [])]) dataKeys.set(sec.dataKey, { label: sec.dataLabel, relativeU: sec.relativeU });
  return { faulty, sound, temperatureC, temperatureUK, dataKeys };
}

/** Inputs shared by both bridges: temperature and one scale per set of conductor data. */
function loopInputs(loop: Loop): Record<string, UncertainInput> {
  const inputs: Record<string, UncertainInput> = {
    temperatureC: { value: loop.temperatureC, u: loop.temperatureUK, label: 'conductor temperature' },
  };
  for (const [key, d] of loop.dataKeys)
    inputs[`data:${key}`] = { value: 1, u: d.relativeU, label: `conductor data: ${d.label}`, source: `conductor:${key}` };
  return inputs;
}

function scaleOf(x: Record<string, number>): DataScale {
  const scale: DataScale = {};
  for (const k of Object.keys(x)) if (k.startsWith('data:')) scale[k.slice(5)] = x[k];
  return scale;
}

/** The loop as seen from the test end at the (possibly perturbed) length: faulty out, sound back. */
function loopPath(loop: Loop, end: CableEnd, lengthM: number) {
  const faulty = fromEnd(scaleSections(loop.faulty, lengthM), end);
  const sound = loop.sound ? fromEnd(scaleSections(loop.sound, lengthM), end) : null;
  return { faulty, sound };
}

function beyond(field: string, what: string): never {
  throw new LocateInputError(
    'BEYOND_CABLE',
    field,
    `${what} puts the fault past the far end of the faulty conductor: check that the faulty and sound conductors are not swapped ` +
      'at the bridge, that the far-end strap is tight, and the conductor sizes',
  );
}

/** Distance from the test end for a share `fraction` of the loop's resistance, or ohms `xOhm` along the faulty conductor. */
function distanceOnLoop(
  loop: Loop,
  end: CableEnd,
  x: Record<string, number>,
  at: { fraction: number } | { xOhm: number },
  field: string,
  what: string,
) {
  const { faulty, sound } = loopPath(loop, end, x.installedLengthM);
  const scale = scaleOf(x);
  const T = x.temperatureC;
  let xOhm: number;
  if ('fraction' in at) {
    if (!sound)
      throw new LocateInputError(
        'MISSING',
        `${field}.sound`,
        `${what}: a share of the loop needs the sound conductor's sections`,
      );
    xOhm = at.fraction * (conductorOhm(faulty, T, scale) + conductorOhm(sound, T, scale));
  } else xOhm = at.xOhm;
  const d = distanceAtOhm(faulty, xOhm, T, scale);
  if (d === null) beyond(field, what);
  return d;
}

function loopNotes(loop: Loop, end: CableEnd, run: CableRunInput, measuredOhm: number | undefined): string[] {
  if (measuredOhm === undefined || !loop.sound) return [];
  const { faulty, sound } = loopPath(loop, end, run.installedLengthM);
  const computed = conductorOhm(faulty, loop.temperatureC) + conductorOhm(sound!, loop.temperatureC);
  const off = measuredOhm / computed - 1;
  if (Math.abs(off) <= LOOP_MISMATCH_NOTE) return [];
  return [
    `the measured loop (${measuredOhm.toPrecision(4)} Ω) is ${(Math.abs(off) * 100).toFixed(0)} % ${off > 0 ? 'above' : 'below'} what the ` +
      `conductor data give at ${loop.temperatureC} °C (${computed.toPrecision(4)} Ω): check the far-end strap, the test leads, the sizes entered and the temperature`,
  ];
}

/** Where the Murray loop's balance formula is published, for the forms that show it. */
export const MURRAY_FORMULA_SOURCE = 'V. K. Mehta & R. Mehta, Principles of Power System, ch. "Underground cables", Murray loop test';

/**
 * The Murray balance ratio Q/(P+Q) from the two ratio arms at balance: P on
 * the sound side, Q on the faulty side (balance P/Q = R/X, see above).
 */
export function murrayRatioFromArms(soundSideArmOhm: number, faultySideArmOhm: number): number {
  return faultySideArmOhm / (soundSideArmOhm + faultySideArmOhm);
}

export function murrayLoop(id: string, run: CableRunInput, r: MurrayReading, field = id): LocationEstimate {
  let ratio: number;
  if (r.ratio !== undefined) ratio = finite(`${field}.ratio`, r.ratio, 'Murray bridge ratio');
  else if (r.faultySideArmOhm !== undefined || r.soundSideArmOhm !== undefined) {
    const q = positive(`${field}.faultySideArmOhm`, r.faultySideArmOhm, 'ratio arm on the faulty side');
    const p = positive(`${field}.soundSideArmOhm`, r.soundSideArmOhm, 'ratio arm on the sound side');
    ratio = murrayRatioFromArms(p, q);
  } else throw new LocateInputError('MISSING', `${field}.ratio`, 'Murray loop: give the bridge ratio (or both ratio arms)');
  if (!(ratio > 0 && ratio < 1))
    throw new LocateInputError('OUT_OF_RANGE', `${field}.ratio`, `Murray bridge ratio must be between 0 and 1, got ${ratio}`);
  const loop = resolveLoop(run, r, field);
  const step =
    r.ratioStep === undefined ? DEFAULT_RATIO_STEP : nonNegative(`${field}.ratioStep`, r.ratioStep, 'resolution of the ratio');
  const acc = r.ratioAccuracy === undefined ? 0 : nonNegative(`${field}.ratioAccuracy`, r.ratioAccuracy, 'accuracy of the ratio');
  const loopOhm = r.loopOhm === undefined ? undefined : positive(`${field}.loopOhm`, r.loopOhm, 'loop resistance');
  const inputs: Record<string, UncertainInput> = {
    ...loopInputs(loop),
    ratio: { value: ratio, u: readingU(step, acc), label: 'bridge ratio reading' },
  };
  const what = `Murray ratio ${ratio}`;
  let formula: (x: Record<string, number>) => number;
  if (loop.sound) formula = (x) => distanceOnLoop(loop, r.fromEnd, x, { fraction: x.ratio }, field, what);
  else {
    if (loopOhm === undefined)
      throw new LocateInputError(
        'MISSING',
        `${field}.loopOhm`,
        'Murray loop with an unknown sound conductor: give the measured loop resistance',
      );
    Object.assign(inputs, ohmInputs(field, r, { loopOhm }));
    formula = (x) => distanceOnLoop(loop, r.fromEnd, x, { xOhm: x.ratio * x.loopOhm * x.bridgeGain }, field, what);
  }
  return buildEstimate({
    id,
    method: 'murray-loop',
    label: r.label,
    fromEnd: r.fromEnd,
    run,
    inputs,
    distanceFromEnd: formula,
    notes: loopNotes(loop, r.fromEnd, run, loopOhm),
    field,
  });
}

function ohmInputs(
  field: string,
  r: { ohmStep?: number; accuracyPct?: number },
  readings: Record<string, number>,
): Record<string, UncertainInput> {
  const step =
    r.ohmStep === undefined
      ? DEFAULT_OHM_STEP
      : nonNegative(`${field}.ohmStep`, r.ohmStep, 'resolution of the resistance readings');
  const pct = r.accuracyPct === undefined ? 0 : nonNegative(`${field}.accuracyPct`, r.accuracyPct, 'accuracy of the bridge');
  const inputs: Record<string, UncertainInput> = {
    // One gain error for every resistance the same bridge reads (a rectangular ±pct %).
    bridgeGain: { value: 1, u: pct / 100 / Math.sqrt(3), label: 'bridge accuracy' },
  };
  for (const [k, v] of Object.entries(readings))
    inputs[k] = { value: v, u: readingU(step), label: `${k === 'loopOhm' ? 'loop' : 'rheostat'} reading resolution` };
  return inputs;
}

export function varleyLoop(id: string, run: CableRunInput, r: VarleyReading, field = id): LocationEstimate {
  const k = positive(`${field}.armRatio`, r.armRatio, 'Varley ratio arms a/b');
  const S = nonNegative(`${field}.rheostatOhm`, r.rheostatOhm, 'rheostat at balance');
  const loop = resolveLoop(run, r, field);
  const measured = r.loopOhm === undefined ? undefined : positive(`${field}.loopOhm`, r.loopOhm, 'loop resistance');
  if (!loop.sound && measured === undefined)
    throw new LocateInputError(
      'MISSING',
      `${field}.loopOhm`,
      'Varley loop with an unknown sound conductor: give the measured loop resistance',
    );
  const inputs: Record<string, UncertainInput> = {
    ...loopInputs(loop),
    ...ohmInputs(field, r, measured === undefined ? { rheostatOhm: S } : { rheostatOhm: S, loopOhm: measured }),
  };
  const what = `Varley rheostat ${S} Ω`;
  const loopAt = (x: Record<string, number>) => {
    if (measured !== undefined) return x.loopOhm * x.bridgeGain;
    const { faulty, sound } = loopPath(loop, r.fromEnd, x.installedLengthM);
    return conductorOhm(faulty, x.temperatureC, scaleOf(x)) + conductorOhm(sound!, x.temperatureC, scaleOf(x));
  };
  const xOhmAt = (x: Record<string, number>) => (k * loopAt(x) - x.rheostatOhm * x.bridgeGain) / (k + 1);
  const x0 = Object.fromEntries(Object.entries(inputs).map(([key, v]) => [key, v.value]));
  x0.installedLengthM = run.installedLengthM;
  if (!(xOhmAt(x0) > 0)) {
    throw new LocateInputError(
      'OUT_OF_RANGE',
      `${field}.rheostatOhm`,
      `Varley loop: a rheostat of ${S} Ω with arms ${k} and a loop of ${loopAt(x0).toPrecision(4)} Ω puts the fault before the test end; ` +
        'the rheostat must be below a/b times the loop: check the connections and the arms',
    );
  }
  const formula = loop.sound
    ? (x: Record<string, number>) => distanceOnLoop(loop, r.fromEnd, x, { fraction: xOhmAt(x) / loopAt(x) }, field, what)
    : (x: Record<string, number>) => distanceOnLoop(loop, r.fromEnd, x, { xOhm: xOhmAt(x) }, field, what);
  return buildEstimate({
    id,
    method: 'varley-loop',
    label: r.label,
    fromEnd: r.fromEnd,
    run,
    inputs,
    distanceFromEnd: formula,
    notes: loopNotes(loop, r.fromEnd, run, measured),
    field,
  });
}
