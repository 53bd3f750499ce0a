import { cleanup, fireEvent, screen, waitFor, within } from '@testing-library/react';
import { http, HttpResponse } from 'msw';
import { setupServer } from 'msw/node';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { AdminUsersPage } from '../../src/app/routes/admin-users';
import { renderApp } from './support/render';

const me = { id: 5, email: 'admin@example.com', name: 'Ada Lind', role: 'admin', active: true, mustChangePassword: false, unitPreference: 'm' } as const;
const ines = { id: 7, email: 'tech@example.com', name: 'Ines Ravelo', role: 'technician', active: true, mustChangePassword: false, unitPreference: 'm' } as const;
let created: unknown = null;
const server = setupServer(
  http.get('*/api/auth/csrf', () => HttpResponse.json({ csrfToken: 'token-1' })),
  http.get('*/api/users', () => HttpResponse.json({ items: [me, ines], total: 2, page: 1, pageSize: 25 })),
  http.get('*/api/users/assignable', () => HttpResponse.json([{ id: 7, name: 'Ines Ravelo' }])),
  http.post('*/api/users', async ({ request }) => {
    created = await request.json();
    return HttpResponse.json(
      {
        user: { id: 9, email: 'noor@example.com', name: 'Noor Haddad', role: 'technician', active: true, mustChangePassword: true, unitPreference: 'm' },
        temporaryPassword: 'wren-copper-41-ledge',
      },
      { status: 201 },
    );
  }),
);
beforeAll(() => server.listen({ onUnhandledRequest: 'error' }));
afterEach(() => {
  cleanup();
  created = null;
  Object.defineProperty(navigator, 'clipboard', { value: undefined, configurable: true });
});
afterAll(() => server.close());

async function createNoor() {
  renderApp(<AdminUsersPage />, { me, url: '/admin/users' });
  await screen.findByText('tech@example.com');
  const form = screen.getByRole('button', { name: 'Create account' }).closest('form')!;
  fireEvent.change(within(form).getByLabelText('Name'), { target: { value: 'Noor Haddad' } });
  fireEvent.change(within(form).getByLabelText('E-mail'), { target: { value: 'noor@example.com' } });
  fireEvent.click(screen.getByRole('button', { name: 'Create account' }));
  await screen.findByTestId('temporary-password');
  expect(created).toEqual({ email: 'noor@example.com', name: 'Noor Haddad', role: 'technician' });
}

describe('the temporary password of a new account', () => {
  it('is copied whole by its own button, which says it was', async () => {
    const written: string[] = [];
    Object.defineProperty(navigator, 'clipboard', { value: { writeText: async (t: string) => void written.push(t) }, configurable: true });
    await createNoor();
    expect(screen.getByTestId('temporary-password').textContent).toBe('wren-copper-41-ledge');
    expect(screen.getByTestId('copy-state').textContent).toBe('');
    fireEvent.click(screen.getByRole('button', { name: 'Copy the password' }));
    await waitFor(() => expect(screen.getByTestId('copy-state').textContent).toBe('Copied'));
    expect(written).toEqual(['wren-copper-41-ledge']);
  });

  it('is selected for the device’s own copy where the browser gives no clipboard (plain HTTP)', async () => {
    await createNoor();
    fireEvent.click(screen.getByRole('button', { name: 'Copy the password' }));
    await waitFor(() => expect(screen.getByTestId('copy-state').textContent).toBe('Selected: copy it with your device’s menu'));
    expect(window.getSelection()!.toString()).toBe('wren-copper-41-ledge');
  });
});
