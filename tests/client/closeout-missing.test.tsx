import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { cleanup, fireEvent, render, screen } from '@testing-library/react';
import { afterEach, describe, expect, it } from 'vitest';
import type { TicketDetail } from '../../shared/schemas/tickets';
import { CloseoutForm } from '../../src/features/tickets/components/closeout-form';

afterEach(cleanup);

// Radio mast feeder BF-R1 of the demo: 120 m installed, two markers on the route.
const ticket = {
  id: 4,
  cableRun: {
    id: 3,
    name: 'Radio mast feeder BF-R1',
    installedLengthM: 120,
    endALabel: 'Control kiosk',
    endBLabel: 'Telemetry radio mast',
    markers: [
      { id: 11, label: 'HH-A', kind: 'handhole', chainageM: 48, slackM: 1.5 },
      { id: 12, label: 'Mast foot', kind: 'other', chainageM: 110, slackM: 2 },
    ],
  },
  findings: [{ id: 5, kind: 'short-circuit', measuredFrom: 'B', distanceM: 44.4, roundTripNs: 449.1, vf: 0.66 }],
} as unknown as TicketDetail;

const form = () =>
  render(
    <QueryClientProvider client={new QueryClient()}>
      <CloseoutForm ticket={ticket} unit="m" />
    </QueryClientProvider>,
  );

describe('close-out: the grey "Record the repair" button', () => {
  it('says under it what is still needed, for either way of giving the position, until nothing is', () => {
    form();
    const button = screen.getByRole('button', { name: 'Record the repair' });
    expect((button as HTMLButtonElement).disabled).toBe(true);
    expect(screen.getByTestId('closeout-missing').textContent).toBe('Still needed: the distance past it toward end B.');
    // A screen reader reads the same words with the button.
    expect(button.getAttribute('aria-describedby')).toBe('closeout-missing');

    fireEvent.change(screen.getByLabelText(/^Distance past it toward end B/), { target: { value: '3.5' } });
    expect(screen.queryByTestId('closeout-missing')).toBeNull();
    expect((button as HTMLButtonElement).disabled).toBe(false);
    expect(button.getAttribute('aria-describedby')).toBeNull();

    fireEvent.click(screen.getByRole('button', { name: 'Cable length from an end' }));
    expect((button as HTMLButtonElement).disabled).toBe(true);
    expect(screen.getByTestId('closeout-missing').textContent).toBe('Still needed: the cable length to the fault.');
    fireEvent.change(screen.getByLabelText(/^Cable length to the fault/), { target: { value: 'about 40' } });
    expect(screen.getByTestId('closeout-missing').textContent).toBe('Still needed: the cable length to the fault.');
    fireEvent.change(screen.getByLabelText(/^Cable length to the fault/), { target: { value: '40,5' } });
    expect(screen.queryByTestId('closeout-missing')).toBeNull();
    expect((button as HTMLButtonElement).disabled).toBe(false);
  });
});
