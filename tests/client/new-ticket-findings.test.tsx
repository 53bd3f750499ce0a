import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { cleanup, fireEvent, render, screen } from '@testing-library/react';
import { http, HttpResponse } from 'msw';
import { setupServer } from 'msw/node';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { NewTicketForm } from '../../src/features/tickets/components/new-ticket-form';

const finding = (id: number, measuredFrom: 'A' | 'B', distanceM: number, kind: string, routePositionText = '') => ({
  id,
  kind,
  note: null,
  traceId: id,
  eventIndex: 0,
  measuredFrom,
  roundTripNs: 449.1,
  distanceM,
  uncertaintyM: 1.07,
  windowStartM: distanceM - 1,
  windowEndM: distanceM + 1,
  routePosition: null,
  routePositionText,
  vf: 0.66,
  confirmedBy: { id: 2, name: 'Ines Ravelo' },
  confirmedAt: '2026-12-03T06:22:00.000Z',
  site: { id: 1, name: 'Brookfold pumping station' },
  cableRun: { id: 3, name: 'Radio mast feeder BF-R1' },
});

const server = setupServer(
  http.get('*/api/tickets/unticketed-findings', () => HttpResponse.json([
      finding(5, 'B', 44.4, 'short-circuit', '12.9 m past handhole HH-A toward marker Mast foot; dig on the ground 11.4–14.5 m past HH-A'),
      finding(6, 'A', 143.2, 'open-conductor'),
    ])),
  http.get('*/api/users/assignable', () => HttpResponse.json([])),
);
beforeAll(() => server.listen({ onUnhandledRequest: 'error' }));
afterEach(cleanup);
afterAll(() => server.close());

describe('raising a ticket', () => {
  it('names the end each finding was measured from, as the ticket and the e-mail do', async () => {
    const qc = new QueryClient({ defaultOptions: { queries: { retry: false } } });
    render(
      <QueryClientProvider client={qc}>
        <NewTicketForm unit="m" onCreated={() => {}} />
      </QueryClientProvider>,
    );
    // 44.4 m from end B is 75.6 m from end A on a 120 m run: a bare "at 44.4 m" reads as the wrong place.
    expect((await screen.findByText(/^Short circuit at/)).textContent).toBe('Short circuit at 44.4 m from end B');
    expect(screen.getByText(/^Open conductor at/).textContent).toBe('Open conductor at 143.2 m from end A');
  });

  it('says under the grey "Raise ticket" button that a finding is still needed, until one is picked', async () => {
    render(
      <QueryClientProvider client={new QueryClient({ defaultOptions: { queries: { retry: false } } })}>
        <NewTicketForm unit="m" onCreated={() => {}} />
      </QueryClientProvider>,
    );
    await screen.findByText(/^Short circuit at/);
    const button = screen.getByRole('button', { name: 'Raise ticket' }) as HTMLButtonElement;
    expect(button.disabled).toBe(true);
    expect(screen.getByTestId('new-ticket-missing').textContent).toBe('Still needed: at least one finding to repair.');
    expect(button.getAttribute('aria-describedby')).toBe('new-ticket-missing');
    fireEvent.click(screen.getByLabelText('Finding 5'));
    expect(button.disabled).toBe(false);
    expect(screen.queryByTestId('new-ticket-missing')).toBeNull();
    expect(button.getAttribute('aria-describedby')).toBeNull();
  });

  it('shows where each finding sends the crew to dig, and the caution before anyone digs', async () => {
    render(
      <QueryClientProvider client={new QueryClient({ defaultOptions: { queries: { retry: false } } })}>
        <NewTicketForm unit="ft" onCreated={() => {}} />
      </QueryClientProvider>,
    );
    await screen.findByText(/^Short circuit at/);
    // The stored route sentence, in the viewer's unit: 12.9 m = 42.3 ft, 11.4 m = 37.4 ft, 14.5 m = 47.6 ft.
    expect(screen.getByTestId('new-ticket-dig-5').textContent).toBe(
      'Dig: 42.3 ft past handhole HH-A toward marker Mast foot; dig on the ground 37.4–47.6 ft past HH-A',
    );
    // A finding on a run without route markers has no route sentence: no empty "Dig:" line.
    expect(screen.queryByTestId('new-ticket-dig-6')).toBeNull();
    const form = screen.getByRole('form', { name: 'Raise a ticket' });
    const caution = form.querySelector('[data-testid="dig-caution"]');
    expect(caution?.textContent).toContain('Before anyone digs or climbs: cable de-energised, locked out and proven dead, stored charge discharged');
  });
});
