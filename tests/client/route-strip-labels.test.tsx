import { describe, expect, it } from 'vitest';
import { bottomLabels, labelRows, type PlacedLabel } from '../../src/features/locate/components/route-strip';

/** A strip as wide as a 390 px phone leaves it inside a card (390 − 2 × 16 px page margin − 2 × 16 px card padding). */
const PHONE_STRIP = 326;

/** Where a row-1 leader, from (x, 66) up to (anchorX, 22), is inside the row-0 text band (y 24–40): its x range. */
function leaderInBand(l: PlacedLabel): [number, number] {
  const at = (y: number) => l.x + ((l.anchorX - l.x) * (66 - y)) / 44;
  return [Math.min(at(24), at(40)), Math.max(at(24), at(40))];
}
const cross = (a: [number, number], b: [number, number]) => a[0] < b[1] && b[0] < a[1];

function expectNoOverlap(placed: PlacedLabel[]) {
  const drawn = placed.filter((l) => l.row >= 0);
  for (const a of drawn) {
    for (const b of drawn) {
      if (a === b) continue;
      if (a.row === b.row) expect(cross([a.left, a.right], [b.left, b.right]), `${a.label} and ${b.label} in row ${a.row}`).toBe(false);
      if (a.row === 1 && b.row === 0) expect(cross(leaderInBand(a), [b.left, b.right]), `leader of ${a.label} through ${b.label}`).toBe(false);
    }
    expect(a.left).toBeGreaterThanOrEqual(0);
    expect(a.right).toBeLessThanOrEqual(PHONE_STRIP);
  }
}

describe('route strip labels on a phone', () => {
  it('never draws a label over another, nor a leader line through one, on a crowded route', () => {
    // Six markers within 60 px, as on a 1.4 km run with poles every 40 m near one end.
    const places = ['A', 'Pole 3', 'Pole 4', 'Pole 5', 'SP-4', 'Pole 6', 'MH-12'].map((label, i) => ({ label, x: 14 + i * 10 }));
    const placed = labelRows(places, PHONE_STRIP);
    expectNoOverlap(placed);
    // The first two still get a row each; the rest that cannot be drawn clear are left to their ticks.
    expect(placed.slice(0, 2).map((l) => l.row)).toEqual([0, 1]);
  });

  it('bends a second label’s leader clear of the first instead of striking through it', () => {
    // "Pole 3" at 100 px spans about 73–127 px; "Pole 9" at 120 px has to go up a row.
    const [first, second] = labelRows(
      [
        { label: 'Pole 3', x: 100 },
        { label: 'Pole 9', x: 120 },
      ],
      PHONE_STRIP,
    );
    expect(first.row).toBe(0);
    expect(second.row).toBe(1);
    expect(second.anchorX).toBeGreaterThan(second.x);
    expect(cross(leaderInBand(second), [first.left, first.right])).toBe(false);
  });

  it('keeps spread-out labels next to the line, under their markers', () => {
    const places = [
      { label: 'A', x: 14 },
      { label: 'MH-1', x: 60 },
      { label: 'MH-2', x: 140 },
      { label: 'B', x: 312 },
    ];
    const placed = labelRows(places, PHONE_STRIP);
    expect(placed.map((l) => [l.row, l.anchorX])).toEqual([
      [0, 14],
      [0, 60],
      [0, 140],
      [0, 312],
    ]);
  });

  it('leaves out an end length the best-location label would run into, and keeps both when there is room', () => {
    const near = bottomLabels('0.00 m', '887.0 m', 20, PHONE_STRIP, 14);
    expect(near.from).toBeNull();
    expect(near.to?.text).toBe('887.0 m');
    expect(near.best.left).toBeCloseTo(14, 9);
    const far = bottomLabels('455.0 m', '1493.6 m', PHONE_STRIP - 30, PHONE_STRIP, 14);
    expect(far.to).toBeNull();
    expect(far.best.right).toBeCloseTo(PHONE_STRIP - 14, 9);
    const middle = bottomLabels('0.00 m', '887.0 m', PHONE_STRIP / 2, PHONE_STRIP, 14);
    expect([middle.from?.text, middle.to?.text]).toEqual(['0.00 m', '887.0 m']);
    expect(middle.best.x).toBe(PHONE_STRIP / 2);
    for (const b of [near, far, middle]) {
      if (b.from) expect(b.from.right).toBeLessThan(b.best.left);
      if (b.to) expect(b.to.left).toBeGreaterThan(b.best.right);
    }
  });
});
