import 'fake-indexeddb/auto';
import { QueryClientProvider } from '@tanstack/react-query';
import { cleanup, fireEvent, render, screen } from '@testing-library/react';
import { http, HttpResponse } from 'msw';
import { setupServer } from 'msw/node';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import type { TicketDetail } from '../../shared/schemas/tickets';
import type { PublicUser } from '../../shared/schemas/users';
import { createMemoryRouter, RouterProvider } from 'react-router-dom';
import { TicketPage } from '../../src/app/routes/ticket';
import { DeviceProvider } from '../../src/features/offline/device-context';
import { queryClient } from '../../src/lib/query-client';
import { technicianMe } from './support/fixtures';

const me = technicianMe as PublicUser;

/** Ticket 4 on the demo's Radio mast feeder BF-R1, assigned to the signed-in technician and not started yet. */
const ticket = (status: 'assigned' | 'under-way'): TicketDetail => ({
  id: 4,
  title: 'Short circuit on Radio mast feeder BF-R1',
  status,
  priority: 'high',
  dueDate: null,
  assignee: { id: me.id, name: me.name },
  site: { id: 1, name: 'Bramble Fell' },
  cableRun: {
    id: 3,
    name: 'Radio mast feeder BF-R1',
    endALabel: 'Control kiosk',
    endBLabel: 'Telemetry radio mast',
    installedLengthM: 120,
    cableType: { id: 3, name: 'Solid PE coax, 50 Ω' },
    markers: [{ id: 11, label: 'HH-A', kind: 'handhole', chainageM: 48, slackM: 1.5, notes: null, latitude: null, longitude: null }],
  } as unknown as TicketDetail['cableRun'],
  findingCount: 1,
  createdAt: '2026-12-03T06:00:00.000Z',
  updatedAt: '2026-12-03T06:00:00.000Z',
  mailTrouble: false,
  mine: true,
  notes: null,
  createdBy: { id: 3, name: 'Maren Holt' },
  siteAddress: null,
  accessNotes: null,
  findings: [
    {
      id: 5,
      kind: 'short-circuit',
      note: null,
      traceId: 6,
      eventIndex: 0,
      measuredFrom: 'B',
      roundTripNs: 449.1,
      distanceM: 44.4,
      uncertaintyM: 1.07,
      windowStartM: 43.3,
      windowEndM: 45.5,
      routePosition: null,
      routePositionText: '40.6 m past handhole HH-A toward end B',
      vf: 0.66,
      confirmedBy: { id: me.id, name: me.name },
      confirmedAt: '2026-12-03T05:50:00.000Z',
      bestLocation: null,
    },
  ],
  timeline: [],
  closeouts: [],
  mail: [],
  can:
    status === 'assigned'
      ? { edit: false, moves: [{ to: 'under-way', label: 'Start work' }], closeOut: true, comment: true }
      : { edit: false, moves: [{ to: 'assigned', label: 'Pause work' }], closeOut: true, comment: true },
});

/** Every request the page and the phone's field data made, as "METHOD /path". */
let requests: string[] = [];
let status: 'assigned' | 'under-way' = 'assigned';

const page = <T,>(items: T[]) => HttpResponse.json({ items, total: items.length, page: 1, pageSize: 100 });
const server = setupServer(
  http.get('*/api/auth/csrf', () => HttpResponse.json({ csrfToken: 'token-1' })),
  http.get('*/api/auth/me', () => HttpResponse.json(me)),
  http.get('*/api/sites', () => page([])),
  http.get('*/api/cable-runs', () => page([])),
  http.get('*/api/cables', () => page([])),
  http.get('*/api/tickets', () => page([{ ...ticket(status), cableRun: { id: 3, name: 'Radio mast feeder BF-R1' } }])),
  http.get('*/api/tickets/4', async () => {
    // The answer takes a moment, as over a phone's signal: the field data's refresh starts while the page waits.
    await new Promise((r) => setTimeout(r, 50));
    return HttpResponse.json(ticket(status));
  }),
  http.post('*/api/tickets/4/status', async ({ request }) => {
    const body = (await request.json()) as { to: 'under-way' };
    status = body.to;
    return HttpResponse.json(ticket(status));
  }),
);
server.events.on('request:start', ({ request }) => {
  const url = new URL(request.url);
  if (url.pathname.startsWith('/api/') && url.pathname !== '/api/auth/csrf') requests.push(`${request.method} ${url.pathname}`);
});

beforeAll(() => server.listen({ onUnhandledRequest: 'error' }));
afterEach(() => {
  cleanup();
  queryClient.clear();
  requests = [];
  status = 'assigned';
});
afterAll(() => server.close());

/** The ticket page as the app mounts it for a technician: the app's own query client, under the phone's field data. */
function openTicket() {
  queryClient.setQueryData(['auth', 'me'], me);
  const router = createMemoryRouter(
    [
      {
        path: '/tickets/:ticketId',
        element: (
          <DeviceProvider user={me}>
            <TicketPage />
          </DeviceProvider>
        ),
      },
    ],
    { initialEntries: ['/tickets/4'] },
  );
  render(
    <QueryClientProvider client={queryClient}>
      <RouterProvider router={router} />
    </QueryClientProvider>,
  );
}

const ticketReads = () => requests.filter((r) => r === 'GET /api/tickets/4').length;

describe('the ticket page asks for its ticket once', () => {
  it('on load, while the phone refreshes its field data with the same ticket among the technician’s open repairs', async () => {
    openTicket();
    await screen.findByRole('heading', { name: 'Ticket 4: Short circuit on Radio mast feeder BF-R1' });
    // The field data's refresh has read the list of the technician's repairs, and so reached ticket 4 too.
    await expect.poll(() => requests.includes('GET /api/tickets')).toBe(true);
    await expect.poll(() => requests.includes('GET /api/cables')).toBe(true);
    await new Promise((r) => setTimeout(r, 200));
    expect(ticketReads()).toBe(1);
  });

  it('after a step, takes the ticket from the step’s answer instead of asking for it again', async () => {
    openTicket();
    const start = await screen.findByRole('button', { name: 'Start work' });
    await new Promise((r) => setTimeout(r, 200));
    const before = ticketReads();
    expect(before).toBe(1);
    fireEvent.click(start);
    await screen.findByRole('button', { name: 'Pause work' });
    await new Promise((r) => setTimeout(r, 200));
    expect(requests.filter((r) => r === 'POST /api/tickets/4/status')).toHaveLength(1);
    expect(ticketReads()).toBe(1);
    expect(screen.getByText('Under way', { exact: true })).toBeTruthy();
  });
});
