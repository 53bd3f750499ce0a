import { describe, expect, it } from 'vitest';
import { openDays, openDaysText } from '../../../shared/tickets/age';

describe('a ticket’s age', () => {
  it('counts whole 24-hour days since it was raised, not calendar days', () => {
    // Raised at 23:39, looked at 21 minutes later, just after midnight: under a day.
    expect(openDays('2031-03-04T23:39:00Z', new Date('2031-03-05T00:00:00Z'))).toBe(0);
    // 23 h 59 min later: still under a day.
    expect(openDays('2031-03-04T23:39:00Z', new Date('2031-03-05T23:38:00Z'))).toBe(0);
    // Exactly 24 h: one day.
    expect(openDays('2031-03-04T23:39:00Z', new Date('2031-03-05T23:39:00Z'))).toBe(1);
    // 8 days and 1 minute.
    expect(openDays('2031-03-04T23:39:00Z', new Date('2031-03-12T23:40:00Z'))).toBe(8);
  });

  it('never goes below zero for a clock slightly behind', () => {
    expect(openDays('2031-03-05T00:00:05Z', new Date('2031-03-05T00:00:00Z'))).toBe(0);
  });

  it('says it in words', () => {
    expect([0, 1, 12].map(openDaysText)).toEqual(['under a day', '1 day', '12 days']);
  });
});
