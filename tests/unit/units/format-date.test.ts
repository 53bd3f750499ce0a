import { format } from 'date-fns';
import { describe, expect, it } from 'vitest';
import { formatDate, formatDateTime } from '../../../shared/units/format-date';

describe('dates as Rholog writes them', () => {
  it('reads a date-only value as that calendar day, and a time on the 24-hour clock', () => {
    expect(formatDate('2025-06-03')).toBe('3 Jun 2025');
    expect(formatDateTime(new Date(2025, 5, 3, 14, 5))).toBe('3 Jun 2025, 14:05');
    expect(formatDateTime(new Date(2031, 0, 31, 0, 0))).toBe('31 Jan 2031, 00:00');
    expect(formatDate(null)).toBe('—');
    expect(formatDate('not a date')).toBe('—');
  });

  it('writes every day of two years exactly as date-fns’s own "d MMM yyyy, HH:mm" does', () => {
    for (let i = 0; i < 2 * 366; i++) {
      const d = new Date(2027, 0, 1 + i, (i * 7) % 24, (i * 13) % 60);
      expect(formatDateTime(d)).toBe(format(d, 'd MMM yyyy, HH:mm'));
      expect(formatDate(d)).toBe(format(d, 'd MMM yyyy'));
    }
  });
});
