import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

/**
 * Text on Rholog's screens is read outdoors on phones: every text colour of
 * the palette keeps a contrast ratio of at least 4.5:1 (WCAG 2.x success
 * criterion 1.4.3, level AA, for normal-size text) on the backgrounds it is
 * set on. Contrast ratio and relative luminance as WCAG 2.x defines them.
 */
const css = fs.readFileSync(path.resolve('src/index.css'), 'utf8');
const palette = Object.fromEntries(
  [...css.matchAll(/--color-([a-z-]+):\s*(#[0-9a-f]{6});/gi)].map((m) => [m[1], m[2].toLowerCase()]),
);

function luminance(hex: string): number {
  const [r, g, b] = [1, 3, 5]
    .map((i) => parseInt(hex.slice(i, i + 2), 16) / 255)
    .map((c) => (c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4));
  return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}
function contrast(a: string, b: string): number {
  const [hi, lo] = [luminance(a), luminance(b)].sort((x, y) => y - x);
  return (hi + 0.05) / (lo + 0.05);
}

const AA = 4.5;
const TEXT = ['ink', 'ink-soft', 'mist', 'teal', 'ok', 'warn', 'danger'];
const GROUNDS = ['card', 'paper', 'ok-light', 'warn-light', 'danger-light', 'teal-light', 'copper-light'];

describe('the palette', () => {
  it('holds the colours this test reads', () => {
    for (const name of [...TEXT, ...GROUNDS, 'copper']) expect(palette[name], name).toMatch(/^#[0-9a-f]{6}$/);
  });

  it('keeps every text colour at 4.5:1 or more on white, paper and each light tint', () => {
    const low = TEXT.flatMap((fg) =>
      GROUNDS.filter((bg) => contrast(palette[fg], palette[bg]) < AA).map(
        (bg) => `${fg} on ${bg}: ${contrast(palette[fg], palette[bg]).toFixed(2)}`,
      ),
    );
    expect(low).toEqual([]);
  });

  it('keeps white button text readable on copper, danger and the grey of a disabled button', () => {
    for (const bg of ['copper', 'danger', 'mist']) expect(contrast('#ffffff', palette[bg]), bg).toBeGreaterThanOrEqual(AA);
  });

  it('computes the published ratio for black on white (21:1)', () => {
    expect(contrast('#000000', '#ffffff')).toBeCloseTo(21, 6);
  });
});
