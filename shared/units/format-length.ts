/**
 * Lengths as people read them, in their own unit. Every length Rholog shows
 * (screens, e-mails, the printed crew sheet) is written by this module, so a
 * crew working in feet never reads a metre figure.
 *
 * Lengths are stored in metres. The precision follows the size of the number
 * in the reader's unit, and is the one rule used everywhere:
 *
 *   under 10         → 2 decimals   "3.05 m"  "9.84 ft"
 *   10 up to 1000    → 1 decimal    "80.0 m"  "262.5 ft"
 *   1000 and above   → no decimals  "1312 ft"
 *
 * The rule is applied to the value as it will be printed, so 9.996 is written
 * "10.0", not "10.00". A range ("72.3–87.6 m") takes the precision of its
 * larger end for both ends.
 */
import { M_PER_FT } from '../cable/propagation';

export type LengthUnit = 'm' | 'ft';
export const LENGTH_UNITS: readonly LengthUnit[] = ['m', 'ft'];

/** "metres" / "feet", for axis titles and sentences. */
export const LENGTH_UNIT_WORDS: Record<LengthUnit, string> = { m: 'metres', ft: 'feet' };

export function toUnit(m: number, unit: LengthUnit): number {
  return unit === 'ft' ? m / M_PER_FT : m;
}

export function fromUnit(value: number, unit: LengthUnit): number {
  return unit === 'ft' ? value * M_PER_FT : value;
}

/** Decimals for a value already in the reader's unit (the rule above). */
export function lengthDecimals(value: number): number {
  const a = Math.abs(value);
  if (Number(a.toFixed(2)) < 10) return 2;
  if (Number(a.toFixed(1)) < 1000) return 1;
  return 0;
}

function digits(value: number, decimals: number): string {
  const s = Math.abs(value).toFixed(decimals);
  // No "−0.00": a value that rounds to zero has no sign.
  return value < 0 && Number(s) !== 0 ? `−${s}` : s;
}

const finite = (m: number | null | undefined): m is number => m !== null && m !== undefined && Number.isFinite(m);

/** The number alone, in the reader's unit and precision: "80.0". */
export function lengthNumber(m: number, unit: LengthUnit): string {
  const v = toUnit(m, unit);
  return digits(v, lengthDecimals(v));
}

/**
 * A stored length as the starting value of a form field: plain digits, to
 * the millimetre or the hundredth of a foot (3 mm), so saving the form
 * unchanged moves nothing a tape could show. Display precision is for
 * reading, not for editing.
 */
export function lengthForInput(m: number | null | undefined, unit: LengthUnit): string {
  if (!finite(m)) return '';
  return String(Number(toUnit(m, unit).toFixed(unit === 'ft' ? 2 : 3)));
}

/** "80.0 m", "262.5 ft"; a dash for a missing value. */
export function formatLength(m: number | null | undefined, unit: LengthUnit): string {
  if (!finite(m)) return '—';
  return `${lengthNumber(m, unit)} ${unit}`;
}

/** A difference with its sign always written: "+1.20 m", "−0.45 ft". */
export function formatSignedLength(m: number | null | undefined, unit: LengthUnit): string {
  if (!finite(m)) return '—';
  const text = lengthNumber(m, unit);
  return text.startsWith('−') || Number(text) === 0 ? `${text} ${unit}` : `+${text} ${unit}`;
}

/** "72.3–87.6 m": both ends at the precision of the larger one. */
export function formatLengthRange(startM: number, endM: number, unit: LengthUnit): string {
  if (!finite(startM) || !finite(endM)) return '—';
  const a = toUnit(startM, unit);
  const b = toUnit(endM, unit);
  const d = Math.min(lengthDecimals(a), lengthDecimals(b));
  return `${digits(a, d)}–${digits(b, d)} ${unit}`;
}

/**
 * Rewrites the lengths in a sentence Rholog itself wrote and stored (an
 * engine warning, a stored route sentence, a calibration or close-out note, a
 * server message) into the reader's unit and the one precision rule: metre
 * figures for a reader in feet, feet figures (a note written by someone
 * working in feet) for a reader in metres, and a figure already in the
 * reader's unit to the usual precision. Stored text may therefore keep more
 * digits than it shows. Rates such as "dB/100 m" or "dB per 100 m" are left alone.
 */
export function lengthsInText(text: string, unit: LengthUnit): string {
  if (!text) return text;
  const read = (n: string) => Number(n.replace('−', '-').replace(/,/g, ''));
  // A figure, with thousands written "100,000" or not.
  const figure = '[-−]?(?:\\d{1,3}(?:,\\d{3})+|\\d+)(?:\\.\\d+)?';
  const pattern = new RegExp(`(^|[^\\w./,−-])(${figure})(?:\\s?–\\s?(${figure}))?\\s?(m|ft)\\b(?![/²³])`, 'g');
  return text.replace(pattern, (whole, before: string, first: string, second: string | undefined, from: LengthUnit, offset: number) => {
    const lead = text.slice(Math.max(0, offset - 4), offset + before.length);
    if (/per\s$/i.test(lead)) return whole;
    const a = fromUnit(read(first), from);
    if (second === undefined) return `${before}${formatLength(a, unit)}`;
    return `${before}${formatLengthRange(a, fromUnit(read(second), from), unit)}`;
  });
}
