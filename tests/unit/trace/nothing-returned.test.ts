import { describe, expect, it } from 'vitest';
import type { ReflectionEvent } from '../../../shared/schemas/trace-analysis';
import { nothingReturned } from '../../../shared/trace/analyze';

/**
 * A pulse reading whose only events stand inside the launch's blind zone shows nothing returned from
 * the line: for a wide "launch" that is a step's wave sent back whole by a short, what stands out of
 * its settling there is the level past the short moving (the source's re-reflection, the line's
 * creep), so the reading as a step into a short is still tried. An event past the blind zone is the
 * line answering, and the pulse reading stands. The distances are made up for the test.
 */
function event(distanceM: number, insideBlindZone: boolean): ReflectionEvent {
  return { distanceM, insideBlindZone, type: 'impedance-drop', likelyMultipleOf: null } as unknown as ReflectionEvent;
}

describe('nothingReturned', () => {
  it('holds for a reading with no events', () => {
    expect(nothingReturned([])).toBe(true);
  });

  it('holds when every event lies inside the launch blind zone', () => {
    expect(nothingReturned([event(66.7, true)])).toBe(true);
    expect(nothingReturned([event(12.0, true), event(66.7, true)])).toBe(true);
  });

  it('fails as soon as one event lies past the blind zone', () => {
    expect(nothingReturned([event(66.7, true), event(140.2, false)])).toBe(false);
    expect(nothingReturned([event(140.2, false)])).toBe(false);
  });
});
