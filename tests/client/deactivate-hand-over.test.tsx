import { cleanup, fireEvent, screen, within } from '@testing-library/react';
import { http, HttpResponse } from 'msw';
import { setupServer } from 'msw/node';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { PersonRow } from '../../src/features/users/components/person-row';
import { renderApp } from './support/render';

// jsdom has no modal dialogs; opening one only has to set `open` here.
HTMLDialogElement.prototype.showModal = function showModal(this: HTMLDialogElement) {
  this.open = true;
};
HTMLDialogElement.prototype.close = function close(this: HTMLDialogElement) {
  this.open = false;
};

const server = setupServer(
  http.get('*/api/users/7/open-repairs', () =>
    HttpResponse.json({
      tickets: [
        { id: 12, title: 'Open at HH-2', status: 'under-way', movable: true },
        { id: 15, title: 'Splice at Pole 9', status: 'fixed', movable: false },
      ],
    }),
  ),
);
beforeAll(() => server.listen({ onUnhandledRequest: 'error' }));
afterEach(cleanup);
afterAll(() => server.close());

const ines = { id: 7, email: 'tech@example.com', name: 'Ines Ravelo', role: 'technician', active: true, mustChangePassword: false, unitPreference: 'm' } as const;

describe('deactivating a technician with a fixed repair and one not yet fixed', () => {
  it('says per ticket which moves to the chosen person and which stays, and why', async () => {
    renderApp(
      <ul>
        <PersonRow
          person={ines}
          isMe={false}
          technicians={[ines, { id: 8, name: 'Tomas Ekwueme' }]}
          onPassword={() => {}}
          onDeactivated={() => {}}
        />
      </ul>,
      { router: false },
    );
    fireEvent.click(screen.getByRole('button', { name: 'Deactivate…' }));
    const fates = await screen.findByTestId('repair-fates');
    const [first, second] = within(fates).getAllByRole('listitem');
    expect(first!.textContent).toBe('Ticket 12: Open at HH-2 (Under way) — stays with Ines Ravelo until a supervisor reassigns it');
    expect(second!.textContent).toBe("Ticket 15: Splice at Pole 9 (Fixed, awaiting sign-off) — stays with Ines Ravelo: it is fixed and only waits for a supervisor's sign-off");

    const select = screen.getByLabelText('Hand the one not yet fixed to');
    fireEvent.change(select, { target: { value: '8' } });
    expect(first!.textContent).toBe('Ticket 12: Open at HH-2 (Under way) — moves to Tomas Ekwueme, back to “Assigned”');
    expect(second!.textContent).toContain('stays with Ines Ravelo: it is fixed');
    expect(screen.getByText('It goes back to “Assigned” with the new person, who is e-mailed.')).toBeTruthy();
  });
});
