import { cleanup, screen, within } from '@testing-library/react';
import { http, HttpResponse } from 'msw';
import { setupServer } from 'msw/node';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { can } from '../../shared/auth/permissions';
import { NAV } from '../../src/app/nav';
import { OutboxPage } from '../../src/app/routes/outbox';
import { renderApp } from './support/render';

const supervisor = {
  id: 3,
  email: 'sam.super@example.com',
  name: 'Sam Super',
  role: 'supervisor',
  active: true,
  mustChangePassword: false,
  unitPreference: 'm',
};

const message = (id: number, subject: string) => ({
  id,
  messageId: `<m${id}@example.com>`,
  from: 'Rholog <rholog@example.com>',
  to: 'sam.super@example.com',
  cc: null,
  subject,
  sentAt: '2026-12-01T10:00:00.000Z',
  receivedAt: '2026-12-01T10:00:01.000Z',
  body: `${subject}\n`,
  html: null,
  headers: [],
});

const asked: string[] = [];
const server = setupServer(
  http.get('*/api/auth/me', () => HttpResponse.json(supervisor)),
  http.get('*/api/outbox/mine', ({ request }) => {
    asked.push(new URL(request.url).pathname);
    return HttpResponse.json({
      items: [message(8, 'Ticket 3 fixed, waiting for your sign-off'), message(2, 'Fault confirmed at Harrowmere North substation')],
      total: 2,
      page: 1,
      pageSize: 25,
    });
  }),
  http.get('*/api/outbox/queue', ({ request }) => {
    asked.push(new URL(request.url).pathname);
    return HttpResponse.json({ error: { code: 'forbidden', message: 'not allowed' } }, { status: 403 });
  }),
  http.get('*/api/outbox', ({ request }) => {
    asked.push(new URL(request.url).pathname);
    return HttpResponse.json({ error: { code: 'forbidden', message: 'not allowed' } }, { status: 403 });
  }),
);

beforeAll(() => {
  server.listen({ onUnhandledRequest: 'error' });
  // jsdom has no media queries: the message view asks whether the screen is phone-wide (it is not, here).
  window.matchMedia = (query: string) => ({ matches: false, media: query }) as MediaQueryList;
});
afterEach(() => {
  cleanup();
  asked.length = 0;
});
afterAll(() => server.close());

describe('the Outbox for a supervisor', () => {
  it('is in a supervisor’s menu (not a technician’s) and lists only the mail sent to them, without the send queue', async () => {
    const menu = (role: 'supervisor' | 'technician') => NAV.filter((i) => !i.permission || can(role, i.permission)).map((i) => i.label);
    expect(menu('supervisor')).toContain('Outbox');
    expect(menu('technician')).not.toContain('Outbox');

    renderApp(<OutboxPage />, { me: supervisor, url: '/outbox' });
    const list = await screen.findByTestId('outbox-list');
    expect(within(list).getAllByTestId('outbox-subject').map((s) => s.textContent)).toEqual([
      'Ticket 3 fixed, waiting for your sign-off',
      'Fault confirmed at Harrowmere North substation',
    ]);
    expect(screen.getByText(/The e-mail Rholog sent to you \(sam\.super@example\.com\)/)).toBeTruthy();
    expect(screen.queryByRole('heading', { name: 'Send queue' })).toBeNull();
    expect(screen.queryByLabelText('Recipient contains')).toBeNull();
    expect(asked).toEqual(['/api/outbox/mine']);
  });
});
