import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { cleanup, fireEvent, render, screen } from '@testing-library/react';
import { http, HttpResponse } from 'msw';
import { setupServer } from 'msw/node';
import { createMemoryRouter, RouterProvider } from 'react-router-dom';
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import { api, ApiError, setCsrfToken, setUnauthenticatedHandler } from '../../src/lib/api-client';
import { SignInPage } from '../../src/app/routes/sign-in';

const tokens = { current: 'token-1' };
const server = setupServer(
  http.get('*/api/auth/csrf', () => HttpResponse.json({ csrfToken: tokens.current })),
  http.get('*/api/auth/me', () => HttpResponse.json({ error: { code: 'unauthenticated', message: 'Please sign in.' } }, { status: 401 })),
);

beforeAll(() => server.listen({ onUnhandledRequest: 'error' }));
afterEach(() => {
  server.resetHandlers();
  cleanup();
  setCsrfToken(null);
});
afterAll(() => server.close());

describe('the API client', () => {
  it('sends the CSRF token on a POST and turns an error body into ApiError with the server message', async () => {
    let seen: string | null = null;
    server.use(
      http.post('*/api/things', ({ request }) => {
        seen = request.headers.get('x-csrf-token');
        return HttpResponse.json(
          { error: { code: 'invalid_input', message: 'The input is not valid: name: is required', fields: [{ field: 'name', message: 'is required' }] } },
          { status: 400 },
        );
      }),
    );
    const err = (await api('/api/things', { method: 'POST', body: {} }).catch((e: unknown) => e)) as ApiError;
    expect(seen).toBe('token-1');
    expect(err).toBeInstanceOf(ApiError);
    expect(err.status).toBe(400);
    expect(err.message).toBe('The input is not valid: name: is required');
    expect(err.fields).toEqual([{ field: 'name', message: 'is required' }]);
  });

  it('says the network is gone, as an ApiError, when even the CSRF token cannot be fetched', async () => {
    server.use(http.get('*/api/auth/csrf', () => HttpResponse.error()));
    const err = (await api('/api/things', { method: 'POST', body: {} }).catch((e: unknown) => e)) as ApiError;
    expect(err).toBeInstanceOf(ApiError);
    expect(err.status).toBe(0);
    expect(err.code).toBe('offline');
    expect(err.message).toMatch(/Could not reach Rholog/);
  });

  it('treats a page served in place of the CSRF token (an offline fallback) as offline, not as a crash', async () => {
    server.use(http.get('*/api/auth/csrf', () => new HttpResponse('<!doctype html><title>Rholog</title>', { headers: { 'content-type': 'text/html' } })));
    const err = (await api('/api/things', { method: 'POST', body: {} }).catch((e: unknown) => e)) as ApiError;
    expect(err).toBeInstanceOf(ApiError);
    expect(err.code).toBe('offline');
  });

  it('fetches a fresh CSRF token and retries once when the server says the token is stale', async () => {
    setCsrfToken('stale');
    tokens.current = 'token-2';
    const sent: string[] = [];
    server.use(
      http.post('*/api/retry', ({ request }) => {
        const t = request.headers.get('x-csrf-token')!;
        sent.push(t);
        return t === 'token-2'
          ? HttpResponse.json({ ok: true })
          : HttpResponse.json({ error: { code: 'csrf_invalid', message: 'stale' } }, { status: 403 });
      }),
    );
    await expect(api('/api/retry', { method: 'POST' })).resolves.toEqual({ ok: true });
    expect(sent).toEqual(['stale', 'token-2']);
  });

  it('calls the sign-in handler on a 401 from an ordinary call', async () => {
    const onOut = vi.fn();
    setUnauthenticatedHandler(onOut);
    server.use(http.get('*/api/secret', () => HttpResponse.json({ error: { code: 'unauthenticated', message: 'Please sign in.' } }, { status: 401 })));
    await expect(api('/api/secret')).rejects.toMatchObject({ status: 401, message: 'Please sign in.' });
    expect(onOut).toHaveBeenCalledTimes(1);
  });
});

describe('the sign-in page', () => {
  it("shows the server's message when the password is wrong", async () => {
    server.use(
      http.post('*/api/auth/login', () =>
        HttpResponse.json({ error: { code: 'wrong_credentials', message: 'The e-mail address or password is not right.' } }, { status: 401 }),
      ),
    );
    const router = createMemoryRouter([{ path: '/sign-in', element: <SignInPage /> }], { initialEntries: ['/sign-in'] });
    render(
      <QueryClientProvider client={new QueryClient({ defaultOptions: { queries: { retry: false } } })}>
        <RouterProvider router={router} />
      </QueryClientProvider>,
    );
    fireEvent.change(screen.getByLabelText('E-mail'), { target: { value: 'tech@example.com' } });
    fireEvent.change(screen.getByLabelText('Password'), { target: { value: 'wrong' } });
    fireEvent.click(screen.getByRole('button', { name: 'Sign in' }));
    expect((await screen.findByRole('alert')).textContent).toContain('The e-mail address or password is not right.');
  });
});
