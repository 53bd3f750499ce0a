import { cleanup, fireEvent, screen, waitFor } from '@testing-library/react';
import { http, HttpResponse } from 'msw';
import { setupServer } from 'msw/node';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { CloseoutForm } from '../../src/features/tickets/components/closeout-form';
import { mastFeederTicket } from './support/fixtures';
import { renderApp } from './support/render';

const MESSAGE = 'must be 0 or more and stay on the route: Mast foot is at 110 m and the route ends at 116.5 m';
let posted = 0;
const server = setupServer(
  http.get('*/api/auth/csrf', () => HttpResponse.json({ csrfToken: 'token-1' })),
  // What the server answers for a found position past the end of the route.
  http.post('*/api/tickets/4/closeout', () => {
    posted++;
    return HttpResponse.json(
      { error: { code: 'invalid_input', message: `found.offsetM: ${MESSAGE}`, fields: [{ field: 'found.offsetM', message: MESSAGE }] } },
      { status: 422 },
    );
  }),
);
beforeAll(() => server.listen({ onUnhandledRequest: 'error' }));
afterEach(cleanup);
afterAll(() => server.close());

const ticket = mastFeederTicket;

const shown = () => screen.queryAllByText((_, el) => !!el && el.children.length === 0 && (el.textContent ?? '').includes('stay on the route'));

describe('close-out: a found position off the route', () => {
  it('is said once, under the distance, before and after the server has answered', async () => {
    const { qc } = renderApp(<CloseoutForm ticket={ticket} unit="m" />, { router: false });
    fireEvent.change(screen.getByLabelText('Route marker'), { target: { value: '12' } });
    const distance = screen.getByLabelText(/^Distance past it toward end B/);
    fireEvent.change(distance, { target: { value: '27' } });
    expect(shown()).toHaveLength(1);
    fireEvent.change(screen.getByLabelText('What was done'), { target: { value: 'New straight joint' } });
    fireEvent.click(screen.getByRole('button', { name: 'Record the repair' }));
    await waitFor(() => expect(qc.getMutationCache().getAll()[0]?.state.status).toBe('error'));
    expect(posted).toBe(1);
    expect(distance.getAttribute('aria-invalid')).toBe('true');
    expect(shown()).toHaveLength(1);
    // A position on the route clears it.
    fireEvent.change(distance, { target: { value: '5' } });
    expect(shown()).toHaveLength(0);
    expect(screen.getByTestId('closeout-preview').textContent).toContain('Found');
  });
});
