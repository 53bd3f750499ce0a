import { cleanup, render, screen } from '@testing-library/react';
import { afterEach, describe, expect, it } from 'vitest';
import type { CloseoutView, TicketDetail } from '../../shared/schemas/tickets';
import { SignOffSummary } from '../../src/features/tickets/components/sign-off-summary';

afterEach(cleanup);

const closeout: CloseoutView = {
  id: 4,
  findingId: 9,
  method: 'marker',
  markerLabel: 'MH-2',
  offsetM: 85,
  fromEnd: null,
  enteredDistanceM: null,
  measuredFrom: 'A',
  foundDistanceM: 405,
  foundFromAM: 405,
  foundChainageM: 395,
  locatedDistanceM: 400.2,
  errorM: -4.8,
  errorFraction: -0.0119,
  roundTripNs: 4057.5,
  traceVf: 0.66,
  impliedVf: 0.668,
  cause: 'water-ingress',
  workDone: 'Cut out the wet length, new straight joint',
  calibrationId: 12,
  recordedBy: { id: 2, name: 'Ines Ravelo' },
  recordedAt: '2026-12-03T14:05:00.000Z',
};

const ticket = (closeouts: CloseoutView[]) =>
  ({
    id: 7,
    title: 'Water in the cable on Feeder HN-3 to Ashby Lane',
    site: { id: 1, name: 'Harrowmere North substation' },
    cableRun: { id: 3, name: 'Feeder HN-3 to Ashby Lane', endALabel: 'Substation bay 3', endBLabel: 'Ashby Lane ring main unit' },
    closeouts,
  }) as unknown as TicketDetail;

describe('the sign-off summary', () => {
  it('says what is being signed for: the ticket, where the fault was found against where it was located, the work and the calibration', () => {
    render(<SignOffSummary t={ticket([closeout])} unit="m" />);
    const box = screen.getByTestId('sign-off-summary');
    expect(box.textContent).toContain('Water in the cable on Feeder HN-3 to Ashby Lane');
    expect(box.textContent).toContain('Feeder HN-3 to Ashby Lane · Harrowmere North substation');
    expect(screen.getByTestId('sign-off-found').textContent).toBe(
      'Found 405.0 m from end A (85.0 m on the ground past MH-2); located 400.2 m (located − found −4.80 m).',
    );
    expect(screen.getByTestId('sign-off-work').textContent).toBe('Water in the cable: Cut out the wet length, new straight joint');
    expect(box.textContent).toContain('Recorded by Ines Ravelo');
    expect(box.textContent).toContain('Filed field calibration 12 (implied velocity factor 0.668).');
  });

  it('says so when no close-out is recorded and no calibration was filed', () => {
    render(<SignOffSummary t={ticket([])} unit="ft" />);
    expect(screen.getByTestId('sign-off-found').textContent).toBe('No close-out is recorded on this ticket.');
    cleanup();
    render(<SignOffSummary t={ticket([{ ...closeout, calibrationId: null, method: 'distance', markerLabel: null, offsetM: null }])} unit="ft" />);
    // 405 m = 1328.7 ft and 400.2 m = 1313.0 ft, shown whole above 1000 ft; −4.8 m = −15.7 ft.
    expect(screen.getByTestId('sign-off-found').textContent).toBe('Found 1329 ft from end A; located 1313 ft (located − found −15.7 ft).');
    expect(screen.getByTestId('sign-off-summary').textContent).toContain('No calibration filed.');
  });
});
