import { describe, expect, it } from 'vitest';
import { lossFitSignificant, nextOnsetAfter } from '../../../shared/trace/edge-fit';

describe('the end of an event’s fit window', () => {
  it('is the next event’s onset when the readings keep the detection’s order', () => {
    const events = [{ onsetIdx: 1000 }, { onsetIdx: 2400 }, { onsetIdx: 5200 }];
    expect(nextOnsetAfter(events, 0, 9000)).toBe(2400);
    expect(nextOnsetAfter(events, 1, 9000)).toBe(5200);
    expect(nextOnsetAfter(events, 2, 9000)).toBe(9000);
  });

  it('passes over a later event whose slow edge was read back before this one', () => {
    // Event 2's tangent reading (a lossy echo's tail read back towards its foot) lands at 4300, before event 1's
    // 5500: it does not end event 1's window, which runs to event 3 (or the record's end).
    const events = [{ onsetIdx: 2300 }, { onsetIdx: 5500 }, { onsetIdx: 4300 }, { onsetIdx: 7600 }];
    expect(nextOnsetAfter(events, 1, 12000)).toBe(7600);
    expect(nextOnsetAfter(events, 1, 6000)).toBe(6000);
    expect(nextOnsetAfter(events.slice(0, 3), 1, 12000)).toBe(12000);
    // Event 0 still ends at the nearest onset after it, event 2's.
    expect(nextOnsetAfter(events, 0, 12000)).toBe(4300);
  });
});

describe('whether an estimated loss is kept', () => {
  it('needs the lossless residual higher than the best by nine residuals per degree of freedom', () => {
    // 100 degrees of freedom, best residual 2.0: the noise per degree of freedom is 0.02, the margin 0.18.
    expect(lossFitSignificant(2.19, 2.0, 100)).toBe(true);
    expect(lossFitSignificant(2.17, 2.0, 100)).toBe(false);
  });

  it('is refused when the fits measured nothing (no finite residual)', () => {
    expect(lossFitSignificant(Infinity, Infinity, 100)).toBe(false);
    expect(lossFitSignificant(Infinity, 2.0, 100)).toBe(false);
    expect(lossFitSignificant(3.0, Number.NaN, 100)).toBe(false);
  });
});
