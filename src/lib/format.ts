import { formatDistanceToNowStrict } from 'date-fns';
import { MARKER_KIND_LABELS, type MarkerKind } from '../../shared/schemas/sites';

/**
 * Lengths on screen go through the shared formatter, the same one the
 * e-mails and server-written text use: one precision rule, the reader's unit.
 */
export {
  formatLength,
  formatLengthRange,
  formatSignedLength,
  fromUnit,
  LENGTH_UNIT_WORDS,
  lengthForInput,
  lengthNumber,
  lengthsInText,
  toUnit,
  type LengthUnit,
} from '../../shared/units/format-length';

/** Dates in the one style shared with the e-mails. */
export { formatDate, formatDateTime } from '../../shared/units/format-date';

export function formatAge(value: string | Date | null | undefined): string {
  if (!value) return '—';
  return formatDistanceToNowStrict(new Date(value), { addSuffix: true });
}

/** "1 route marker", "3 route markers", "0 route markers". */
export function countOf(n: number, singular: string, plural = `${singular}s`): string {
  return `${n} ${n === 1 ? singular : plural}`;
}

/** A marker kind standing alone (a list, a table cell, a drop-down): "Road crossing". */
export function markerKindTitle(kind: string): string {
  const words = MARKER_KIND_LABELS[kind as MarkerKind] ?? kind.replace(/-/g, ' ');
  return words.charAt(0).toUpperCase() + words.slice(1);
}
