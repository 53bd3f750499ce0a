import { format, formatDistanceToNowStrict } from 'date-fns';

export type LengthUnit = 'm' | 'ft';
// 1 ft = 0.3048 m exactly (international foot, 1959 agreement).
const M_PER_FT = 0.3048;

export function toUnit(m: number, unit: LengthUnit): number {
  return unit === 'ft' ? m / M_PER_FT : m;
}
export function fromUnit(value: number, unit: LengthUnit): number {
  return unit === 'ft' ? value * M_PER_FT : value;
}

/** "412.3 m" / "1352.7 ft"; precision follows the size so short runs keep decimetres. */
export function formatLength(m: number | null | undefined, unit: LengthUnit, digits?: number): string {
  if (m === null || m === undefined || !Number.isFinite(m)) return '—';
  const v = toUnit(m, unit);
  const d = digits ?? (Math.abs(v) < 100 ? 2 : 1);
  return `${v.toFixed(d)} ${unit}`;
}

export function formatDateTime(value: string | Date | null | undefined): string {
  if (!value) return '—';
  return format(new Date(value), 'd MMM yyyy, HH:mm');
}
export function formatDate(value: string | Date | null | undefined): string {
  if (!value) return '—';
  return format(new Date(value), 'd MMM yyyy');
}
export function formatAge(value: string | Date | null | undefined): string {
  if (!value) return '—';
  return formatDistanceToNowStrict(new Date(value), { addSuffix: true });
}
