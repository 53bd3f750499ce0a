import { cleanup, fireEvent, screen } from '@testing-library/react';
import { http, HttpResponse } from 'msw';
import { setupServer } from 'msw/node';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { CalibrationsPage } from '../../src/app/routes/calibrations';
import { calibrationReviewHandlers, demoPlanner, pendingCalibration } from './support/fixtures';
import { renderApp } from './support/render';

const pending = pendingCalibration();
const planner = demoPlanner;
let accepted = false;
let acceptBody: unknown = null;
const server = setupServer(
  http.get('*/api/auth/me', () => HttpResponse.json(planner)),
  ...calibrationReviewHandlers(
    () => (accepted ? [] : [pending]),
    () => [pending],
  ),
  http.post('*/api/calibrations/2/accept', async ({ request }) => {
    acceptBody = await request.json();
    accepted = true;
    return HttpResponse.json({ calibration: { ...pending, status: 'accepted' }, cable: { id: 3, name: 'Solid PE coax, 50 Ω', vf: 0.6462, vfTolerance: 0.02 } });
  }),
);
beforeAll(() => server.listen({ onUnhandledRequest: 'error' }));
afterEach(cleanup);
afterAll(() => server.close());

describe('the calibration review queue', () => {
  it('says what became of a calibration once it has left the Waiting list', async () => {
    renderApp(<CalibrationsPage />, { me: planner });
    fireEvent.click(await screen.findByRole('button', { name: /^Accept into the library: VF 0\.6462/ }));
    // The queue is empty now; without a word, the planner cannot tell an accepted calibration from a lost one.
    await screen.findByText('Nothing is waiting for review.');
    // With what the form showed (library 0.66 ± 2 %, none accepted), so an accept by someone else meanwhile is refused, not overwritten.
    expect(acceptBody).toEqual({ vf: 0.6462, vfTolerance: 0.02, basedOn: { vf: 0.66, vfTolerance: 0.02, acceptedCount: 0 } });
    expect(screen.getByText(/^Calibration #2 accepted/).textContent).toBe(
      'Calibration #2 accepted: Solid PE coax, 50 Ω is now VF 0.6462 ± 2.0 % in the library. It is listed under Accepted.',
    );
  });
});
