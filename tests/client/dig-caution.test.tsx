import { cleanup, render, screen } from '@testing-library/react';
import { afterEach, describe, expect, it } from 'vitest';
import { DistanceBlock, placeEvent } from '../../src/features/findings/components/where-to-dig';

afterEach(cleanup);

const run = {
  installedLengthM: 120,
  endALabel: 'Control kiosk',
  endBLabel: 'Telemetry radio mast',
  markers: [
    { id: 1, label: 'HH-A', kind: 'handhole' as const, chainageM: 48, slackM: 1.5 },
    { id: 2, label: 'Mast foot', kind: 'other' as const, chainageM: 110, slackM: 2 },
  ],
};

describe('the distance block of an event not yet decided', () => {
  it('puts the short caution straight after the sentence that says where to dig', () => {
    const e = { distanceM: 44.4, windowStartM: 43.4, windowEndM: 45.5 };
    render(<DistanceBlock distanceM={e.distanceM} windowStartM={e.windowStartM} windowEndM={e.windowEndM} end="B" endLabel="Telemetry radio mast" unit="m" pos={placeEvent(run, 'B', e)} />);
    const place = screen.getByTestId('route-position');
    expect(place.textContent).toMatch(/past marker Mast foot toward handhole HH-A; dig on the ground/);
    const caution = screen.getByTestId('dig-caution');
    expect(caution.textContent).toMatch(/^Before anyone digs or climbs: cable de-energised, locked out and proven dead, stored charge discharged/);
    // The caution follows the sentence in reading order, within the same block.
    expect(place.closest('p')!.nextElementSibling).toBe(caution);
  });
});
