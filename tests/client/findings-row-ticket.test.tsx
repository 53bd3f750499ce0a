import { cleanup, screen } from '@testing-library/react';
import { http, HttpResponse } from 'msw';
import { setupServer } from 'msw/node';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { FindingsPage } from '../../src/app/routes/findings';
import { listedFinding, technicianMe } from './support/fixtures';
import { renderApp } from './support/render';

const server = setupServer(
  http.get('*/api/auth/me', () => HttpResponse.json(technicianMe)),
  http.get('*/api/sites', () => HttpResponse.json({ items: [], total: 0, page: 1, pageSize: 100 })),
  http.get('*/api/findings', () =>
    HttpResponse.json({
      items: [
        { ...listedFinding(1), tickets: [{ id: 2, title: 'Open conductor on Radio mast feeder BF-R1', status: 'under-way' }] },
        { ...listedFinding(5), tickets: [] },
        { ...listedFinding(7), status: 'dismissed', tickets: [] },
      ],
      total: 3,
      page: 1,
      pageSize: 25,
    }),
  ),
);
beforeAll(() => server.listen({ onUnhandledRequest: 'error' }));
afterEach(cleanup);
afterAll(() => server.close());

describe('the findings list', () => {
  it("names each confirmed finding's repair ticket, links to it, and says when there is none yet", async () => {
    renderApp(<FindingsPage />, { me: technicianMe, url: '/findings' });
    await screen.findByText('finding 1 route words');
    const links = screen.getAllByTestId('finding-row-ticket');
    expect(links.map((l) => l.textContent)).toEqual(['On repair ticket 2 (under way)']);
    expect(links[0]!.getAttribute('href')).toBe('/tickets/2');
    // Finding 5 is confirmed with no ticket; the dismissed finding 7 needs none, so says nothing.
    expect(screen.getAllByTestId('finding-row-no-ticket').map((n) => n.textContent)).toEqual(['No repair ticket yet']);
  });
});
