import { describe, expect, it } from 'vitest';
import { signInDelayMs } from '../../../server/auth/sign-in-limits';

// The defaults: slowed after 5 failures, 500 ms doubling, capped at 10 s.
const DEFAULTS = { slowAfter: 5, delayMs: 500, maxDelayMs: 10_000 };

describe('signInDelayMs', () => {
  it('waits nothing up to the threshold', () => {
    for (let n = 0; n < 5; n++) expect(signInDelayMs(n, DEFAULTS)).toBe(0);
  });

  it('doubles from the first delay with each further failure', () => {
    expect([5, 6, 7, 8, 9].map((n) => signInDelayMs(n, DEFAULTS))).toEqual([500, 1000, 2000, 4000, 8000]);
  });

  it('never waits longer than the cap, however many failures (so the owner is slowed, never shut out)', () => {
    expect(signInDelayMs(10, DEFAULTS)).toBe(10_000);
    expect(signInDelayMs(1000, DEFAULTS)).toBe(10_000);
  });
});
