import { cleanup, fireEvent, screen } from '@testing-library/react';
import { http, HttpResponse } from 'msw';
import { setupServer } from 'msw/node';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { FindingsPage } from '../../src/app/routes/findings';
import { listedFinding, technicianMe } from './support/fixtures';
import { renderApp } from './support/render';

const me = technicianMe;
const finding = listedFinding(7);

/** What the findings list answers next, one answer per request: then the list itself. */
let answers: Array<'network' | 500 | 403> = [];
let asked = 0;

const server = setupServer(
  http.get('*/api/auth/me', () => HttpResponse.json(me)),
  http.get('*/api/sites', () => HttpResponse.json({ items: [], total: 0, page: 1, pageSize: 100 })),
  http.get('*/api/findings', () => {
    asked += 1;
    const next = answers.shift();
    if (next === 'network') return HttpResponse.error();
    if (next === 500)
      return HttpResponse.json({ error: { code: 'internal', message: 'Something went wrong on the server.' } }, { status: 500 });
    if (next === 403)
      return HttpResponse.json({ error: { code: 'forbidden', message: 'Your role may not do that.' } }, { status: 403 });
    return HttpResponse.json({ items: [finding], total: 1, page: 1, pageSize: 25 });
  }),
);

beforeAll(() => server.listen({ onUnhandledRequest: 'error' }));
afterEach(() => {
  cleanup();
  answers = [];
  asked = 0;
});
afterAll(() => server.close());

function show() {
  renderApp(<FindingsPage />, { me, url: '/findings' });
}

describe('a list that could not load', () => {
  it('says there was no connection and loads again from its own button, without reloading the app', async () => {
    answers = ['network'];
    show();
    const alert = await screen.findByRole('alert');
    expect(alert.textContent).toBe('That did not workCould not reach Rholog. Check the connection and try again.Try again');
    expect(asked).toBe(1);
    fireEvent.click(screen.getByRole('button', { name: 'Try again' }));
    expect(await screen.findByText('finding 7 route words')).toBeTruthy();
    expect(asked).toBe(2);
    expect(screen.queryByRole('alert')).toBeNull();
  });

  it('offers to try again after the server failed, and keeps the notice while the second try fails too', async () => {
    answers = [500, 'network'];
    show();
    await screen.findByText('Something went wrong on the server.');
    fireEvent.click(screen.getByRole('button', { name: 'Try again' }));
    expect(await screen.findByText('Could not reach Rholog. Check the connection and try again.')).toBeTruthy();
    expect(asked).toBe(2);
    expect((screen.getByRole('button', { name: 'Try again' }) as HTMLButtonElement).disabled).toBe(false);
  });

  it('does not offer to try again what the server refused', async () => {
    answers = [403];
    show();
    await screen.findByText('Your role may not do that.');
    expect(screen.queryByRole('button', { name: 'Try again' })).toBeNull();
  });
});
