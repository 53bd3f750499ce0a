import { cleanup, screen } from '@testing-library/react';
import { setupServer } from 'msw/node';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { CalibrationsPage } from '../../src/app/routes/calibrations';
import { calibrationReviewHandlers, demoPlanner, pendingCalibration } from './support/fixtures';
import { renderApp } from './support/render';

const held = 'its repair, ticket 4, is fixed, awaiting sign-off';
let items = [pendingCalibration({ id: 2, ticketId: 4, acceptHeld: held }), pendingCalibration({ id: 3 })];
const server = setupServer(...calibrationReviewHandlers(() => items));
beforeAll(() => server.listen({ onUnhandledRequest: 'error' }));
afterEach(cleanup);
afterAll(() => server.close());

describe('a calibration whose repair is not signed off yet', () => {
  it('says so first, in its badge and above the form, and offers no accept form until then; one that can be accepted keeps it', async () => {
    renderApp(<CalibrationsPage />, { me: demoPlanner });
    const blocked = await screen.findByTestId('calibration-2');
    const open = screen.getByTestId('calibration-3');
    expect(blocked.textContent).toContain("Waiting for the repair's sign-off");
    expect(blocked.textContent).not.toContain('Waiting for review');
    expect(screen.getByTestId('accept-held-2').textContent).toBe(
      "Waiting for the repair's sign-offIt cannot be accepted yet: its repair, ticket 4, is fixed, awaiting sign-off. You may reject it now.",
    );
    expect([...blocked.querySelectorAll('button')].map((b) => b.textContent)).toEqual(['Reject…']);
    await screen.findAllByLabelText('VF to store');
    expect(open.textContent).toContain('Waiting for review');
    expect([...open.querySelectorAll('button')].some((b) => /^Accept into the library/.test(b.textContent ?? ''))).toBe(true);
    expect(screen.getAllByLabelText('VF to store')).toHaveLength(1);
    items = [];
  });
});
