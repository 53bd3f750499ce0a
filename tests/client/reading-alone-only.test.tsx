import { cleanup, render, screen } from '@testing-library/react';
import { afterEach, describe, expect, it } from 'vitest';
import type { BestLocationView } from '../../shared/schemas/measurements';
import { onlyReadingOf, ReadingAlone } from '../../src/features/findings/components/where-to-dig';

afterEach(cleanup);

// One TDR reading from end A of the 116.5 m radio mast feeder: 62.4 m, its 95 % window 60.9–64.0 m, which
// is also the best location's (one window per reading, k = 2), so the card under the headline has nothing to add.
const tdr = (findingId: number, over: object = {}) => ({
  id: `tdr-${findingId}`,
  method: 'tdr-single-ended',
  label: `TDR from end A (finding ${findingId})`,
  findingId,
  measurementId: null,
  fromEnd: 'A',
  distanceFromEndM: 62.4,
  standardUncertaintyM: 0.795,
  windowStartM: 60.9,
  windowEndM: 64.0,
  weight: 1,
  used: true,
  note: null,
  ...over,
});
const best = (methods: object[], distanceFromAM: number | null = 62.4) => ({ methods, distanceFromAM }) as unknown as BestLocationView;

const props = {
  distanceM: 62.4,
  uncertaintyM: 1.59,
  windowStartM: 60.9,
  windowEndM: 64.0,
  end: 'A' as const,
  endLabel: 'Control kiosk',
  unit: 'm' as const,
  pos: null,
  storedText: '12.9 m past handhole HH-A toward marker Mast foot; dig on the ground 11.4–14.5 m past HH-A',
  distanceTestId: 'ticket-distance',
  fused: true,
};

describe('a finding read once, under its best location', () => {
  it('knows when the best location is this reading and no other', () => {
    expect(onlyReadingOf(best([tdr(1)]), 1)).toBe(true);
    // Another finding's reading, a second reading, a bridge reading, or no location at all: the card keeps its figures.
    expect(onlyReadingOf(best([tdr(2)]), 1)).toBe(false);
    expect(onlyReadingOf(best([tdr(1), tdr(2, { used: false })]), 1)).toBe(false);
    expect(onlyReadingOf(best([tdr(1, { method: 'murray-loop', measurementId: 4 })]), 1)).toBe(false);
    expect(onlyReadingOf(best([tdr(1)], null), 1)).toBe(false);
    expect(onlyReadingOf(null, 1)).toBe(false);
  });

  it('says the best location is this reading instead of repeating its distance, window and route word for word', () => {
    render(<ReadingAlone {...props} only />);
    const card = screen.getByTestId('reading-alone');
    expect(card.textContent).toBe('The best location above is this reading alone: the same distance, window and place to dig.');
    expect(card.textContent).not.toContain('60.9–64.0 m');
    expect(screen.queryByTestId('ticket-distance')).toBeNull();
  });

  it('gives the distance from end B when the reading was taken there, the headline counting from end A', () => {
    render(<ReadingAlone {...props} end="B" endLabel="Telemetry radio mast" distanceM={54.1} only />);
    expect(screen.getByTestId('ticket-distance').textContent).toBe('Measured from end B (Telemetry radio mast): 54.1 m along the cable, ± 1.59 m (95 %)');
  });

  it('keeps every line of the reading when other readings share the location', () => {
    render(<ReadingAlone {...props} only={false} />);
    const card = screen.getByTestId('reading-alone');
    expect(card.textContent).toContain('This reading alone (dig by the best location above)');
    expect(card.textContent).toContain('Cable-length window of this reading alone: 60.9–64.0 m from end A, slack included');
  });
});
