import { cleanup, fireEvent, screen } from '@testing-library/react';
import { afterEach, describe, expect, it } from 'vitest';
import { CloseoutForm } from '../../src/features/tickets/components/closeout-form';
import { mastFeederTicket } from './support/fixtures';
import { renderApp } from './support/render';

afterEach(cleanup);

const ticket = mastFeederTicket;

const form = () => renderApp(<CloseoutForm ticket={ticket} unit="m" />, { router: false });

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
