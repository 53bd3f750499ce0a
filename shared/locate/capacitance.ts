/**
 * Capacitance method for an open (broken) conductor: the broken conductor's
 * capacitance, measured from the test end, is that of the length still
 * connected to it. With C' the capacitance per metre for the same measurement
 * (the same reference: the other conductor of the pair, or the screen and the
 * other cores tied together):
 *   d = C_x / C'                                 (per-metre value from the cable library)
 *   d = L · C_x / C_s                            (C_s: a sound conductor of the same cable, whole length)
 *   d = L · C_x / (C_x + C_y)                    (C_y: the same broken conductor measured from the other end)
 * The last two need no per-metre value, and the meter's gain error cancels in
 * their ratio. The formulas follow from C = C'·l on a uniform line (common
 * practice for locating opens on pairs and multi-core cables). Lead
 * capacitance is taken off every reading.
 */
import { LocateInputError, nonNegative, positive } from './errors';
import {
  buildEstimate,
  readingU,
  type CableEnd,
  type CableRunInput,
  type LocationEstimate,
  type UncertainInput,
} from './estimate';

/** Resolution of a capacitance reading when none is given, F. */
export const DEFAULT_CAPACITANCE_STEP_F = 1e-12;
/** ± accuracy of a capacitance meter when none is given, % of reading. */
export const DEFAULT_CAPACITANCE_ACCURACY_PCT = 1;
/** Relative standard uncertainty of a per-metre capacitance when none is given. */
export const DEFAULT_PER_M_RELATIVE_U = 0.05;
/**
 * Relative standard uncertainty from the capacitance per metre varying along
 * the cable and between its conductors, for the methods that compare two
 * readings (default 1 %).
 */
export const DEFAULT_UNIFORMITY_RELATIVE_U = 0.01;

export interface CapacitanceReading {
  fromEnd: CableEnd;
  /** The broken conductor, measured from the test end, F. */
  measuredF: number;
  /** A sound conductor of the same cable over the whole length, measured the same way, F. */
  soundF?: number;
  /** The same broken conductor measured from the other end, F. */
  otherEndF?: number;
  /** The cable's capacitance per metre for this measurement, F/m. */
  perMF?: number;
  /** Relative standard uncertainty of perMF (default 5 %). */
  perMRelativeU?: number;
  /** Relative standard uncertainty from non-uniform capacitance along the cable, for the sound-conductor and other-end forms (default 1 %). */
  uniformityRelativeU?: number;
  /** Capacitance of the test leads, taken off each reading, F (default 0: the meter was zeroed with its leads). */
  leadF?: number;
  leadUF?: number;
  /** Resolution of the readings, F (default 1 pF). */
  stepF?: number;
  /** ± accuracy of the meter, % of reading (default 1 %), one gain error for every reading. */
  accuracyPct?: number;
  label?: string;
}

export function capacitanceMethod(id: string, run: CableRunInput, r: CapacitanceReading, field = id): LocationEstimate {
  const L = positive('installedLengthM', run.installedLengthM, 'installed length');
  const cx = positive(`${field}.measuredF`, r.measuredF, 'capacitance of the broken conductor');
  const step =
    r.stepF === undefined
      ? DEFAULT_CAPACITANCE_STEP_F
      : nonNegative(`${field}.stepF`, r.stepF, 'resolution of the capacitance readings');
  const pct =
    r.accuracyPct === undefined
      ? DEFAULT_CAPACITANCE_ACCURACY_PCT
      : nonNegative(`${field}.accuracyPct`, r.accuracyPct, 'accuracy of the meter');
  const lead = r.leadF === undefined ? 0 : nonNegative(`${field}.leadF`, r.leadF, 'lead capacitance');
  const leadU = r.leadUF === undefined ? 0 : nonNegative(`${field}.leadUF`, r.leadUF, 'uncertainty of the lead capacitance');
  if (!(cx > lead))
    throw new LocateInputError(
      'OUT_OF_RANGE',
      `${field}.measuredF`,
      'the broken conductor reads no more than the test leads: the break is at the test end, or the leads are open',
    );
  const inputs: Record<string, UncertainInput> = {
    cx: { value: cx, u: readingU(step), label: 'reading resolution, broken conductor' },
    gain: { value: 1, u: pct / 100 / Math.sqrt(3), label: 'meter accuracy' },
    lead: { value: lead, u: leadU, label: 'test-lead capacitance' },
  };
  const given = [r.soundF, r.otherEndF, r.perMF].filter((v) => v !== undefined).length;
  if (given !== 1)
    throw new LocateInputError(
      'MISSING',
      `${field}.soundF`,
      "capacitance method: give exactly one of a sound conductor's capacitance, the reading from the other end, or the capacitance per metre",
    );
  let formula: (x: Record<string, number>) => number;
  const nf = (f: number) => `${(f * 1e9).toPrecision(4)} nF`;
  if (r.soundF !== undefined) {
    const cs = positive(`${field}.soundF`, r.soundF, 'capacitance of the sound conductor');
    if (cx > cs)
      throw new LocateInputError(
        'OUT_OF_RANGE',
        `${field}.measuredF`,
        `the broken conductor reads ${nf(cx)}, above the whole cable's ${nf(cs)} (the sound conductor): check it is the same pair and reference, and that the far end is open`,
      );
    inputs.cs = { value: cs, u: readingU(step), label: 'reading resolution, sound conductor' };
    inputs.uniformity = uniformityInput(field, r);
    formula = (x) => (x.uniformity * x.installedLengthM * (x.gain * x.cx - x.lead)) / (x.gain * x.cs - x.lead);
  } else if (r.otherEndF !== undefined) {
    const cy = positive(`${field}.otherEndF`, r.otherEndF, 'capacitance from the other end');
    inputs.cy = { value: cy, u: readingU(step), label: 'reading resolution, other end' };
    inputs.uniformity = uniformityInput(field, r);
    formula = (x) => {
      const a = x.gain * x.cx - x.lead;
      const b = x.gain * x.cy - x.lead;
      return (x.uniformity * x.installedLengthM * a) / (a + b);
    };
  } else {
    const perM = positive(`${field}.perMF`, r.perMF, 'capacitance per metre');
    const rel =
      r.perMRelativeU === undefined
        ? DEFAULT_PER_M_RELATIVE_U
        : nonNegative(`${field}.perMRelativeU`, r.perMRelativeU, 'relative uncertainty of the capacitance per metre');
    if (cx - lead > perM * L)
      throw new LocateInputError(
        'OUT_OF_RANGE',
        `${field}.measuredF`,
        `the broken conductor reads ${nf(cx - lead)}, above the whole cable's ${nf(perM * L)} (${L} m at ${(perM * 1e12).toPrecision(4)} pF/m): ` +
          'check the pair, the reference and the capacitance per metre',
      );
    inputs.perM = { value: perM, u: perM * rel, label: 'capacitance per metre' };
    formula = (x) => (x.gain * x.cx - x.lead) / x.perM;
  }
  return buildEstimate({
    id,
    method: 'capacitance',
    label: r.label,
    fromEnd: r.fromEnd,
    run,
    inputs,
    distanceFromEnd: formula,
    field,
  });
}

function uniformityInput(field: string, r: CapacitanceReading): UncertainInput {
  const u =
    r.uniformityRelativeU === undefined
      ? DEFAULT_UNIFORMITY_RELATIVE_U
      : nonNegative(`${field}.uniformityRelativeU`, r.uniformityRelativeU, 'relative uncertainty from non-uniform capacitance');
  return { value: 1, u, label: 'capacitance per metre along the cable' };
}
