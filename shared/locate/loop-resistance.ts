/**
 * Loop-resistance method for a low-resistance short between two conductors:
 * the resistance measured at the test end across the two conductors is that of
 * both conductors out to the short, plus the short itself and the test leads:
 *   R_meas = R_lead + R_fault + ∫₀^d (r'_1 + r'_2) dx,   r'(T) = r'_20 · (1 + α20·(T − 20 °C))
 * With uniform conductors d = (R_meas − R_lead − R_fault) / (r'_1 + r'_2).
 * Resistance per metre at 20 °C from the datasheet or IEC 60228; α20 for
 * copper 0.00393 /K (IEC 60028) and aluminium 0.00403 /K (IEC 60889), see
 * conductors.ts. The fault resistance is unknown but not negative: a bolted
 * short is taken as 0…R_max, a rectangular distribution (GUM §4.3.7), so half
 * of R_max comes off with R_max/√12 of uncertainty.
 */
import {
  fromEnd,
  resolveConductor,
  scaleSections,
  sectionOhmPerM,
  temperatureInput,
  type ConductorSection,
  type DataScale,
  type ResolvedSection,
} from './conductors';
import { LocateInputError, nonNegative, positive } from './errors';
import {
  buildEstimate,
  readingU,
  type CableEnd,
  type CableRunInput,
  type LocationEstimate,
  type UncertainInput,
} from './estimate';

/** Default resolution of a low-resistance ohmmeter, Ω. */
export const DEFAULT_LOW_OHM_STEP = 0.001;

export interface LoopResistanceReading {
  fromEnd: CableEnd;
  /** Measured across the two shorted conductors at the test end, Ω. */
  loopOhm: number;
  /** Test-lead resistance to take off, Ω (default 0). */
  leadOhm?: number;
  /** The largest resistance the short itself may have, Ω (default 0: a bolted short). */
  faultOhmMax?: number;
  /** One conductor, sections listed from end A. */
  first: ConductorSection[];
  /** The other conductor: the same construction (default) or its own sections. */
  second?: ConductorSection[] | 'same';
  temperatureC?: number;
  temperatureUK?: number;
  /** Resolution of the ohmmeter, Ω (default 0.001 Ω). */
  ohmStep?: number;
  /** ± accuracy of the ohmmeter, % of reading (default 0). */
  accuracyPct?: number;
  label?: string;
}

/** Distance along a pair until `ohm` of loop resistance is used up, or null past the far end. */
export function pairDistanceAtOhm(
  first: ResolvedSection[],
  second: ResolvedSection[],
  ohm: number,
  temperatureC: number,
  scale: DataScale = {},
): number | null {
  const edges = (secs: ResolvedSection[]) => {
    let at = 0;
    return secs.map((s) => (at += s.lengthM));
  };
  const e1 = edges(first);
  const e2 = edges(second);
  let i = 0;
  let j = 0;
  let at = 0;
  let left = ohm;
  while (i < first.length && j < second.length) {
    const end = Math.min(e1[i], e2[j]);
    const r = sectionOhmPerM(first[i], temperatureC, scale) + sectionOhmPerM(second[j], temperatureC, scale);
    const pieceOhm = (end - at) * r;
    if (left <= pieceOhm) return at + left / r;
    left -= pieceOhm;
    at = end;
    if (e1[i] <= end) i++;
    if (e2[j] <= end) j++;
  }
  return left <= 1e-12 * ohm ? at : null;
}

export function loopResistanceMethod(id: string, run: CableRunInput, r: LoopResistanceReading, field = id): LocationEstimate {
  const L = positive('installedLengthM', run.installedLengthM, 'installed length');
  const loopOhm = positive(`${field}.loopOhm`, r.loopOhm, 'loop resistance');
  const leadOhm = r.leadOhm === undefined ? 0 : nonNegative(`${field}.leadOhm`, r.leadOhm, 'test-lead resistance');
  const faultMax =
    r.faultOhmMax === undefined ? 0 : nonNegative(`${field}.faultOhmMax`, r.faultOhmMax, 'largest fault resistance');
  const step =
    r.ohmStep === undefined ? DEFAULT_LOW_OHM_STEP : nonNegative(`${field}.ohmStep`, r.ohmStep, 'resolution of the ohmmeter');
  const pct = r.accuracyPct === undefined ? 0 : nonNegative(`${field}.accuracyPct`, r.accuracyPct, 'accuracy of the ohmmeter');
  const first = resolveConductor(r.first, L, `${field}.first`);
  const second = r.second === undefined || r.second === 'same' ? first : resolveConductor(r.second, L, `${field}.second`);
  const { temperatureC, temperatureUK } = temperatureInput(field, r.temperatureC, r.temperatureUK);
  if (!(loopOhm - leadOhm - faultMax / 2 > 0))
    throw new LocateInputError(
      'OUT_OF_RANGE',
      `${field}.loopOhm`,
      `the loop reads ${loopOhm} Ω, no more than the test leads and the short itself: the short is at the test end, or the leads are wrong`,
    );
  const inputs: Record<string, UncertainInput> = {
    loopOhm: { value: loopOhm, u: readingU(step), label: 'ohmmeter resolution' },
    gain: { value: 1, u: pct / 100 / Math.sqrt(3), label: 'ohmmeter accuracy' },
    leadOhm: { value: leadOhm, u: readingU(step), label: 'test-lead resistance' },
    faultOhm: { value: faultMax / 2, u: faultMax / Math.sqrt(12), label: 'resistance of the short itself' },
    temperatureC: { value: temperatureC, u: temperatureUK, label: 'conductor temperature' },
  };
  const keys = new Map<string, ResolvedSection>();
  for (const s of [...first, ...second]) keys.set(s.dataKey, s);
  for (const [key, s] of keys)
    inputs[`data:${key}`] = { value: 1, u: s.relativeU, label: `conductor data: ${s.dataLabel}`, source: `conductor:${key}` };
  const formula = (x: Record<string, number>) => {
    const scale: DataScale = {};
    for (const k of keys.keys()) scale[k] = x[`data:${k}`];
    const a = fromEnd(scaleSections(first, x.installedLengthM), r.fromEnd);
    const b = fromEnd(scaleSections(second, x.installedLengthM), r.fromEnd);
    const d = pairDistanceAtOhm(a, b, x.gain * x.loopOhm - x.leadOhm - x.faultOhm, x.temperatureC, scale);
    if (d === null)
      throw new LocateInputError(
        'BEYOND_CABLE',
        field,
        `the loop reads ${loopOhm} Ω, more than the whole pair out to the far end at ${temperatureC} °C: ` +
          'the fault is not a low-resistance short, the far end is not open, or the conductor data are wrong',
      );
    return d;
  };
  const notes = faultMax > 0 ? [] : ['the short is taken as bolted (no resistance of its own): a resistive short reads long'];
  return buildEstimate({
    id,
    method: 'loop-resistance',
    label: r.label,
    fromEnd: r.fromEnd,
    run,
    inputs,
    distanceFromEnd: formula,
    notes,
    field,
  });
}
