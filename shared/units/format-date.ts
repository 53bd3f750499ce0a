/**
 * Dates as Rholog writes them, on screen and in e-mails alike (date-fns):
 * "3 Jun 2025" and "3 Jun 2025, 14:05", 24-hour clock. A date-only value
 * ("2025-06-03", a due date) is a calendar day, read without a time zone.
 */
import { format, parseISO } from 'date-fns';

const DATE = 'd MMM yyyy';
const DATE_TIME = 'd MMM yyyy, HH:mm';

function toDate(value: string | Date): Date {
  return typeof value === 'string' ? parseISO(value) : value;
}

export function formatDate(value: string | Date | null | undefined): string {
  if (!value) return '—';
  const d = toDate(value);
  return Number.isNaN(d.getTime()) ? '—' : format(d, DATE);
}

export function formatDateTime(value: string | Date | null | undefined): string {
  if (!value) return '—';
  const d = toDate(value);
  return Number.isNaN(d.getTime()) ? '—' : format(d, DATE_TIME);
}
