import { cleanup, render, screen } from '@testing-library/react';
import { afterEach, describe, expect, it } from 'vitest';
import type { BestLocationView } from '../../shared/schemas/measurements';
import { BestLocationHeadline, LocationMethods } from '../../src/features/locate/components/best-location';

afterEach(cleanup);

// One TDR reading from end B of a 120 m run: 44.4 m from B, its 95 % window ±1.07 m on its own; from end A the
// installed length's ±1.2 m joins in, so its standard uncertainty as used is 1.31 m.
const best = {
  methods: [
    {
      id: 'tdr-5',
      method: 'tdr-single-ended',
      label: 'TDR from end B (finding 5)',
      findingId: 5,
      measurementId: null,
      fromEnd: 'B',
      distanceFromEndM: 44.4,
      standardUncertaintyM: 1.31,
      windowStartM: 73.0,
      windowEndM: 78.1,
      weight: 1,
      used: true,
      note: null,
    },
  ],
  distanceFromAM: 75.6,
  windowStartM: 73.0,
  windowEndM: 78.1,
  standardUncertaintyM: 1.31,
  routePosition: null,
  consistent: true,
  verdict: 'One reading only: nothing to compare it with.',
  outlier: null,
  checks: [],
  test: null,
  excluded: [],
  assumptions: [],
} as unknown as BestLocationView;

describe('the readings of a fault, as a phone lists them', () => {
  it('says which uncertainty the ± is, as the wide table heads its column', () => {
    render(<LocationMethods best={best} unit="m" />);
    const item = screen.getByTestId('location-methods-list').querySelector('li')!;
    // Beside a 95 % window, a bare "± 1.31 m" reads as that window's half-width.
    expect(item.textContent).toContain('44.4 m from end B · standard uncertainty ± 1.31 m · weight 100 %');
    // The figure stays with its sign and unit when the line wraps on a phone.
    const figure = [...item.querySelectorAll('span')].find((el) => el.textContent === '± 1.31 m');
    expect(figure?.className).toContain('whitespace-nowrap');
  });
});

describe('the best location headline', () => {
  it('keeps the ± of the standard uncertainty with its figure and unit when the line wraps', () => {
    const run = { name: 'Radio mast feeder BF-R1', endALabel: 'Control kiosk', endBLabel: 'Telemetry radio mast', installedLengthM: 120, markers: [] };
    render(<BestLocationHeadline best={best} run={run as never} unit="m" strip={false} />);
    // The percentage beside each reading is its share of the location, and says so.
    expect(screen.getByTestId('best-methods').textContent).toBe("Made from, with each reading's share: TDR from end B (finding 5), 100 %");
    const line = screen.getByTestId('best-window');
    expect(line.textContent).toBe('95 % window: 73.0–78.1 m along the cable from end A · standard uncertainty ± 1.31 m');
    const figure = [...line.querySelectorAll('span')].find((el) => el.textContent === '± 1.31 m');
    expect(figure?.className).toContain('whitespace-nowrap');
  });
});
