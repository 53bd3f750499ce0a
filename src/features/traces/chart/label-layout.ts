/**
 * Places text labels along a horizontal axis so that no two overlap: each
 * label sits centred on its x where it can (kept inside the plot), in the
 * first row where it clears every label already placed by `gap` pixels; a
 * label that fits in no row is left out (its line is still drawn). Labels
 * are placed in order of priority, then from left to right, so the ones
 * that matter most are never the ones left out.
 */
export interface LabelItem {
  id: string;
  /** Pixel position of what the label names. */
  x: number;
  /** Width of the label's box in pixels. */
  width: number;
  /** Higher first; 0 when not given. */
  priority?: number;
}

export interface PlacedLabel {
  id: string;
  x: number;
  /** Left edge of the label's box. */
  left: number;
  width: number;
  /** Row, from 0; -1 when not shown. */
  row: number;
  shown: boolean;
}

export interface LayoutOptions {
  rows: number;
  /** Clear space between two labels in one row, px. */
  gap?: number;
  /** The plot's extent: a label stays inside it, and one whose x is outside is not shown. */
  minX?: number;
  maxX?: number;
}

export function layoutLabels(items: readonly LabelItem[], opts: LayoutOptions): PlacedLabel[] {
  const gap = opts.gap ?? 4;
  const minX = opts.minX ?? -Infinity;
  const maxX = opts.maxX ?? Infinity;
  const rows: Array<Array<{ left: number; right: number }>> = Array.from({ length: Math.max(0, opts.rows) }, () => []);
  const order = items
    .map((item, i) => ({ item, i }))
    .sort((a, b) => (b.item.priority ?? 0) - (a.item.priority ?? 0) || a.item.x - b.item.x || a.i - b.i);
  const placed: PlacedLabel[] = new Array(items.length);
  for (const { item, i } of order) {
    const inView = item.x >= minX && item.x <= maxX;
    let left = item.x - item.width / 2;
    if (Number.isFinite(maxX)) left = Math.min(left, maxX - item.width);
    if (Number.isFinite(minX)) left = Math.max(left, minX);
    const right = left + item.width;
    const row = inView ? rows.findIndex((boxes) => boxes.every((b) => right + gap <= b.left || left >= b.right + gap)) : -1;
    if (row >= 0) rows[row].push({ left, right });
    placed[i] = { id: item.id, x: item.x, left, width: item.width, row, shown: row >= 0 };
  }
  return placed;
}

/** How many rows the shown labels use (0 when none is shown). */
export function rowsUsed(placed: readonly PlacedLabel[]): number {
  return placed.reduce((n, p) => Math.max(n, p.row + 1), 0);
}
