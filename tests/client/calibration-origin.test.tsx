import { cleanup, screen, within } from '@testing-library/react';
import { http, HttpResponse } from 'msw';
import { setupServer } from 'msw/node';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { CalibrationsPage } from '../../src/app/routes/calibrations';
import { calibrationReviewHandlers, demoPlanner, pendingCalibration } from './support/fixtures';
import { renderApp } from './support/render';

// A close-out calibration (ticket 9's repair, read off trace 6) and one typed in by hand with neither.
const closeout = pendingCalibration({ ticketId: 9 });
const typedIn = pendingCalibration({ id: 3, source: 'manual', traceId: null, ticketId: null });
const planner = demoPlanner;
const server = setupServer(
  http.get('*/api/auth/me', () => HttpResponse.json(planner)),
  ...calibrationReviewHandlers(() => [closeout, typedIn]),
);
beforeAll(() => server.listen({ onUnhandledRequest: 'error' }));
afterEach(cleanup);
afterAll(() => server.close());

describe('the calibration review queue: where a VF came from', () => {
  it('links a close-out calibration to its repair ticket and its trace, and one typed in by hand to neither', async () => {
    renderApp(<CalibrationsPage />, { me: planner });
    const item = await screen.findByTestId('calibration-2');
    expect(within(item).getByRole('link', { name: 'ticket 9' }).getAttribute('href')).toBe('/tickets/9');
    expect(within(item).getByRole('link', { name: 'trace 6' }).getAttribute('href')).toBe('/traces/6');
    expect(within(item).getByText(/^Ines Ravelo/).textContent).toBe('Ines Ravelo · 3 Dec 2026, 06:28 · ticket 9 · trace 6');

    const manual = screen.getByTestId('calibration-3');
    expect(within(manual).queryByRole('link', { name: /^(ticket|trace) / })).toBeNull();
  });
});
