import { onlineManager, QueryClientProvider } from '@tanstack/react-query';
import { cleanup, fireEvent, render, screen } from '@testing-library/react';
import { http, HttpResponse } from 'msw';
import { setupServer } from 'msw/node';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { queryClient } from '../../src/lib/query-client';
import { CloseoutForm } from '../../src/features/tickets/components/closeout-form';
import { mastFeederTicket } from './support/fixtures';

const ticket = mastFeederTicket;

/** Each close-out the server was sent, and whether the phone has signal for it. */
let received: unknown[] = [];
let signal = false;

const server = setupServer(
  http.get('*/api/auth/csrf', () => HttpResponse.json({ csrfToken: 'token-1' })),
  http.post('*/api/tickets/4/closeout', async ({ request }) => {
    if (!signal) return HttpResponse.error();
    received.push(await request.json());
    return HttpResponse.json({ id: 4, status: 'fixed' });
  }),
);

beforeAll(() => server.listen({ onUnhandledRequest: 'error' }));
afterEach(() => {
  cleanup();
  queryClient.clear();
  onlineManager.setOnline(true);
  received = [];
  signal = false;
});
afterAll(() => server.close());

describe('close-out: recording the repair with no signal', () => {
  it('says at once that Rholog could not be reached, keeps what was typed, and records it when tried again with signal', async () => {
    // The phone has told the app it is offline (the browser's offline event), as in a pit with no signal.
    onlineManager.setOnline(false);
    // The app's own query client, with the defaults every page has.
    render(
      <QueryClientProvider client={queryClient}>
        <CloseoutForm ticket={ticket} unit="m" />
      </QueryClientProvider>,
    );
    fireEvent.change(screen.getByLabelText(/^Distance past it toward end B/), { target: { value: '3.5' } });
    fireEvent.change(screen.getByLabelText('What was done'), { target: { value: 'Cut out the crushed length, new joint.' } });
    const button = screen.getByRole('button', { name: 'Record the repair' }) as HTMLButtonElement;
    fireEvent.click(button);

    // Not a grey button waiting unseen for the network: the words, and the button back to press again.
    expect((await screen.findByRole('alert')).textContent).toContain(
      'Could not reach Rholog. Check the connection and try again.',
    );
    expect(button.disabled).toBe(false);
    expect(received).toEqual([]);
    expect((screen.getByLabelText('What was done') as HTMLTextAreaElement).value).toBe('Cut out the crushed length, new joint.');
    expect((screen.getByLabelText(/^Distance past it toward end B/) as HTMLInputElement).value).toBe('3.5');

    // With the signal back, the same button records it once.
    onlineManager.setOnline(true);
    signal = true;
    fireEvent.click(button);
    await expect.poll(() => received.length).toBe(1);
    expect(received[0]).toMatchObject({
      workDone: 'Cut out the crushed length, new joint.',
      found: { markerId: 11, offsetM: 3.5 },
    });
  });
});
