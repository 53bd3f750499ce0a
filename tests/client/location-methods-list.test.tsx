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

describe('whether the readings agree, in plain words', () => {
  const run = { name: 'Feeder HN-3 to Ashby Lane', endALabel: 'Substation bay 3', endBLabel: 'Ashby Lane ring main unit', installedLengthM: 887, markers: [] };

  it('says two readings agree without the test figures, which stand in full beside the readings', () => {
    const agreeing = {
      ...best,
      verdict: 'The 2 readings agree (χ² = 0.02 on 1 degree of freedom, 95 % limit 3.84).',
      test: { chiSquare: 0.02, degreesOfFreedom: 1, limit95: 3.84 },
    } as unknown as BestLocationView;
    render(<BestLocationHeadline best={agreeing} run={run as never} unit="m" strip={false} />);
    expect(screen.getByTestId('best-verdict').textContent).toBe('The 2 readings agree.');
    cleanup();
    render(<LocationMethods best={agreeing} unit="m" />);
    expect(screen.getByTestId('agreement-test').textContent).toMatch(/^Agreement test: χ² = 0\.02 on 1 degree of freedom \(95 % limit 3\.84\)\./);
  });

  it('names the reading set aside and how far off it is, without χ² or σ, when one of three stands apart', () => {
    // As shared/locate/fuse.ts words an outlier: 80 m off, 7.1 standard uncertainties.
    const disagreeing = {
      ...best,
      consistent: false,
      verdict:
        'The readings disagree (χ² = 50.40 on 2 degrees of freedom, 95 % limit 5.99). Murray loop from end A (reading 1) stands apart, 80.0 m further from end A than the others (7.1 σ); the other 2 agree and give the location without it.',
    } as unknown as BestLocationView;
    render(<BestLocationHeadline best={disagreeing} run={run as never} unit="ft" strip={false} />);
    expect(screen.getByTestId('best-verdict').textContent).toBe(
      'The readings disagree. Murray loop from end A (reading 1) stands apart, 262.5 ft further from end A than the others; the other 2 agree and give the location without it.',
    );
  });

  it('says why a reading was set aside in plain words, with its σ only under the figure for experts', () => {
    // As shared/locate/fuse.ts sets aside an outlier: 80 m further from end A than the other two, 7.1 standard uncertainties.
    const disagreeing = {
      ...best,
      consistent: false,
      verdict:
        'The readings disagree (χ² = 50.40 on 2 degrees of freedom, 95 % limit 5.99). Murray loop from end A (reading 1) stands apart, 80.0 m further from end A than the others (7.1 σ); the other 2 agree and give the location without it.',
      outlier: { methodId: 'murray-1', label: 'Murray loop from end A (reading 1)', offsetM: 80, sigmas: 7.1 },
      checks: ['that the looped conductor is sound and the far-end strap is tight'],
    } as unknown as BestLocationView;
    render(<BestLocationHeadline best={disagreeing} run={run as never} unit="ft" strip={false} />);
    const box = screen.getByTestId('best-set-aside');
    // 80 m = 262.47 ft (0.3048 m per international foot).
    expect(box.querySelector('p')!.textContent).toBe(
      'Set aside: Murray loop from end A (reading 1) puts the fault 262.5 ft further from end A than the other readings do. That is more than their uncertainties can explain, so it was left out and the best location comes from the others. Check that reading (end, cable, velocity factor) before relying on it.',
    );
    // Outside the folded figure, no σ anywhere on the headline.
    const figure = screen.getByTestId('best-set-aside-figure');
    expect(figure.closest('details')!.open).toBe(false);
    expect(figure.textContent).toBe(
      '7.1 σ: the gap is 7.1 times its standard uncertainty (σ); a reading more than 1.96 σ from the others is out of line at the 95 % level.',
    );
    const shown = screen.getByTestId('best-location').cloneNode(true) as HTMLElement;
    shown.querySelector('details')!.remove();
    expect(shown.textContent).not.toContain('σ');
    expect(box.querySelector('summary')!.textContent).toBe('The figure behind it');
    expect(box.querySelector('summary')!.className).toContain('min-h-11');
  });

  it('says why there is no location when readings disagree and none stands apart, in the same plain words', () => {
    const split = {
      ...best,
      consistent: false,
      distanceFromAM: null,
      windowStartM: null,
      windowEndM: null,
      verdict:
        'The readings disagree (χ² = 50.00 on 1 degree of freedom, 95 % limit 3.84) and no single one stands apart, so they are not averaged into a location: TDR from end A (finding 1) and Murray loop from end A (reading 1) are 80.0 m apart (limit 22.2 m). A third, independent method would tell which one is wrong.',
    } as unknown as BestLocationView;
    render(<BestLocationHeadline best={split} run={run as never} unit="m" strip={false} />);
    const notice = screen.getByText(/^The readings disagree and no single one stands apart/);
    expect(notice.textContent).toBe(
      'The readings disagree and no single one stands apart, so they are not averaged into a location: TDR from end A (finding 1) and Murray loop from end A (reading 1) are 80.0 m apart (limit 22.2 m). A third, independent method would tell which one is wrong.',
    );
  });
});
