/**
 * Dates as Rholog writes them, on screen and in e-mails alike (date-fns):
 * "3 Jun 2025" and "3 Jun 2025, 14:05", 24-hour clock. A date-only value
 * ("2025-06-03", a due date) is a calendar day, read without a time zone.
 */
import { lightFormat, parseISO } from 'date-fns';

/** English month abbreviations, as date-fns's en-US locale writes them (`MMM`); lightFormat carries no locale, so a first load need not either. */
const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];
const day = (d: Date) => `${d.getDate()} ${MONTHS[d.getMonth()]} ${lightFormat(d, 'yyyy')}`;

function toDate(value: string | Date): Date {
  return typeof value === 'string' ? parseISO(value) : value;
}

export function formatDate(value: string | Date | null | undefined): string {
  if (!value) return '—';
  const d = toDate(value);
  return Number.isNaN(d.getTime()) ? '—' : day(d);
}

export function formatDateTime(value: string | Date | null | undefined): string {
  if (!value) return '—';
  const d = toDate(value);
  return Number.isNaN(d.getTime()) ? '—' : `${day(d)}, ${lightFormat(d, 'HH:mm')}`;
}
