import { describe, expect, it } from 'vitest';
import { wrapLabel } from '../../../src/features/dashboard/components/wrap-label';
import { layoutLabels, rowsUsed, type PlacedLabel } from '../../../src/features/traces/chart/label-layout';

const overlaps = (a: PlacedLabel, b: PlacedLabel, gap: number) => a.row === b.row && a.left < b.left + b.width + gap && b.left < a.left + a.width + gap;

function assertNoOverlap(placed: PlacedLabel[], gap: number) {
  const shown = placed.filter((p) => p.shown);
  for (let i = 0; i < shown.length; i++) for (let j = i + 1; j < shown.length; j++) expect(overlaps(shown[i], shown[j], gap), `${shown[i].id} / ${shown[j].id}`).toBe(false);
}

describe('route-marker labels along the chart', () => {
  it('staggers labels that would touch into the next row, and leaves out one that fits nowhere (hand-worked)', () => {
    // 40 px labels at 100, 105 and 110 px: centred boxes [80,120], [85,125], [90,130] all overlap.
    const placed = layoutLabels(
      [
        { id: 'MH-1', x: 100, width: 40 },
        { id: 'MH-2', x: 105, width: 40 },
        { id: 'MH-3', x: 110, width: 40 },
        { id: 'P-7', x: 200, width: 40 },
      ],
      { rows: 2, gap: 4 },
    );
    expect(placed.map((p) => [p.id, p.row, p.left])).toEqual([
      ['MH-1', 0, 80],
      ['MH-2', 1, 85],
      ['MH-3', -1, 90],
      ['P-7', 0, 180],
    ]);
    expect(placed[2].shown).toBe(false);
    expect(rowsUsed(placed)).toBe(2);
  });

  it('keeps a label inside the plot, and does not show one whose marker is off the zoomed view', () => {
    const placed = layoutLabels(
      [
        { id: 'near-left', x: 52, width: 60 },
        { id: 'near-right', x: 395, width: 60 },
        { id: 'off', x: 420, width: 30 },
      ],
      { rows: 1, minX: 40, maxX: 400 },
    );
    expect(placed[0].left).toBe(40);
    expect(placed[1].left).toBe(340);
    expect(placed[2].shown).toBe(false);
  });

  it('places higher-priority labels first, so the selected event is never the one left out', () => {
    const placed = layoutLabels(
      [
        { id: '1', x: 100, width: 20 },
        { id: '2', x: 108, width: 20, priority: 1 },
      ],
      { rows: 1 },
    );
    expect(placed.find((p) => p.id === '2')!.shown).toBe(true);
    expect(placed.find((p) => p.id === '1')!.shown).toBe(false);
  });

  it('never overlaps, for many crowded labels at random places and widths', () => {
    // A fixed linear congruential sequence, so every run checks the same cases.
    let seed = 7;
    const rnd = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
    for (let trial = 0; trial < 200; trial++) {
      const items = Array.from({ length: 3 + Math.floor(rnd() * 30) }, (_, i) => ({ id: String(i), x: 40 + rnd() * 320, width: 20 + rnd() * 60 }));
      const placed = layoutLabels(items, { rows: 1 + Math.floor(rnd() * 3), gap: 4, minX: 40, maxX: 360 });
      assertNoOverlap(placed, 4);
      // Every label is either shown in a row or reported as left out; one always fits in an empty plot.
      expect(placed.every((p) => p.shown === p.row >= 0)).toBe(true);
      expect(placed.some((p) => p.shown)).toBe(true);
      for (const p of placed.filter((q) => q.shown)) {
        expect(p.left).toBeGreaterThanOrEqual(40);
        expect(p.left + p.width).toBeLessThanOrEqual(360 + 1e-9);
      }
    }
  });
});

describe('a chart label broken into lines for a phone', () => {
  it('breaks at spaces within the width and keeps a long word whole', () => {
    expect(wrapLabel('PE-insulated telephone pair (1)', 14)).toEqual(['PE-insulated', 'telephone pair', '(1)']);
    expect(wrapLabel('Shielded XLPE MV cable (1)', 14)).toEqual(['Shielded XLPE', 'MV cable (1)']);
    expect(wrapLabel('Unbreakablelongname', 5)).toEqual(['Unbreakablelongname']);
    expect(wrapLabel('  ', 5)).toEqual([]);
  });
});
