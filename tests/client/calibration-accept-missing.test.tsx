import { cleanup, fireEvent, screen } from '@testing-library/react';
import { setupServer } from 'msw/node';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { CalibrationsPage } from '../../src/app/routes/calibrations';
import { calibrationReviewHandlers, demoPlanner, pendingCalibration } from './support/fixtures';
import { renderApp } from './support/render';

const pending = (submittedBy: { id: number; name: string }) => pendingCalibration({ submittedBy });
const planner = demoPlanner;
const admin = { id: 1, email: 'admin@example.com', name: 'Dana Okafor', role: 'admin', active: true, mustChangePassword: false, unitPreference: 'm' };
let item = pending({ id: 2, name: 'Ines Ravelo' });
const server = setupServer(...calibrationReviewHandlers(() => [item]));
beforeAll(() => server.listen({ onUnhandledRequest: 'error' }));
afterEach(cleanup);
afterAll(() => server.close());

function page(user: typeof planner) {
  renderApp(<CalibrationsPage />, { me: user });
}

describe('the grey accept button of the calibration review', () => {
  it('says which of the VF and the tolerance is out of range, until both are in range', async () => {
    item = pending({ id: 2, name: 'Ines Ravelo' });
    page(planner);
    const vf = await screen.findByLabelText('VF to store');
    expect(screen.queryByTestId('accept-missing-2')).toBeNull();
    fireEvent.change(vf, { target: { value: '1.2' } });
    const button = screen.getByRole('button', { name: 'Accept into the library' }) as HTMLButtonElement;
    expect(button.disabled).toBe(true);
    expect(screen.getByTestId('accept-missing-2').textContent).toBe('Still needed: a VF to store above 0 and at most 1.');
    expect(button.getAttribute('aria-describedby')).toBe('accept-missing-2');
    fireEvent.change(screen.getByLabelText('Tolerance (± %)'), { target: { value: '' } });
    expect(screen.getByTestId('accept-missing-2').textContent).toBe('Still needed: a VF to store above 0 and at most 1 and a tolerance of 0 to 50 %.');
    fireEvent.change(vf, { target: { value: '0.6462' } });
    expect(screen.getByTestId('accept-missing-2').textContent).toBe('Still needed: a tolerance of 0 to 50 %.');
    fireEvent.change(screen.getByLabelText('Tolerance (± %)'), { target: { value: '2.0' } });
    expect(screen.queryByTestId('accept-missing-2')).toBeNull();
    expect((screen.getByRole('button', { name: /^Accept into the library: VF 0\.6462/ }) as HTMLButtonElement).disabled).toBe(false);
  });

  it('asks an administrator accepting their own calibration for the reason, until it is long enough', async () => {
    item = pending({ id: 1, name: 'Dana Okafor' });
    page(admin);
    const button = (await screen.findByRole('button', { name: 'Accept my own, with this reason' })) as HTMLButtonElement;
    expect(button.disabled).toBe(true);
    expect(screen.getByTestId('accept-missing-2').textContent).toBe('Still needed: a reason of at least 10 characters for accepting your own calibration.');
    expect(button.getAttribute('aria-describedby')).toBe('accept-missing-2');
    fireEvent.change(screen.getByLabelText('Why you accept your own calibration'), { target: { value: 'Only planner away this week' } });
    expect(button.disabled).toBe(false);
    expect(screen.queryByTestId('accept-missing-2')).toBeNull();
  });
});
