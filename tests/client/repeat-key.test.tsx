import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { act, cleanup, renderHook } from '@testing-library/react';
import { http, HttpResponse } from 'msw';
import { setupServer } from 'msw/node';
import type { ReactNode } from 'react';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { IDEMPOTENCY_KEY } from '../../shared/schemas/traces';
import type { MeasurementInput } from '../../shared/schemas/measurements';
import { useRecordMeasurement } from '../../src/features/locate/api/save-measurement';
import { useCloseOutTicket } from '../../src/features/tickets/api/save-ticket';
import { setCsrfToken } from '../../src/lib/api-client';

/** The Idempotency-Key of every request that reached the server, in order. */
let keys: string[] = [];
/** How the next requests are answered: `lost` never reaches the client (no signal), `busy` is a 503. */
let answers: Array<'lost' | 'busy' | 'ok'> = [];

const next = () => answers.shift() ?? 'ok';
const server = setupServer(
  http.get('*/api/auth/csrf', () => HttpResponse.json({ csrfToken: 'token-1' })),
  http.post('*/api/measurements', ({ request }) => {
    keys.push(request.headers.get('idempotency-key') ?? '(none)');
    const a = next();
    return a === 'lost' ? HttpResponse.error() : HttpResponse.json({ id: 300 + keys.length }, { status: 201 });
  }),
  http.post('*/api/tickets/:id/closeout', ({ request, params }) => {
    keys.push(request.headers.get('idempotency-key') ?? '(none)');
    const a = next();
    if (a === 'lost') return HttpResponse.error();
    if (a === 'busy') return HttpResponse.json({ error: { code: 'database_busy', message: 'Busy; try again.' } }, { status: 503 });
    return HttpResponse.json({ id: Number(params.id), status: 'fixed' });
  }),
);

beforeAll(() => server.listen({ onUnhandledRequest: 'error' }));
afterEach(() => {
  server.resetHandlers();
  cleanup();
  setCsrfToken(null);
  keys = [];
  answers = [];
});
afterAll(() => server.close());

function wrapper({ children }: { children: ReactNode }) {
  const qc = new QueryClient({ defaultOptions: { mutations: { retry: false } } });
  return <QueryClientProvider client={qc}>{children}</QueryClientProvider>;
}

const reading = (ratio: number): MeasurementInput => ({
  findingId: 7,
  kind: 'murray',
  instrument: 'Loop bridge, serial HV-0042',
  readings: { fromEnd: 'A', ratio, faulty: [{ lengthM: 200, material: 'copper', sizeMm2: 16 }] },
});

describe('the Idempotency-Key of a form that makes something', () => {
  it('is the same when a reading whose answer was lost is sent again, and new for the next reading', async () => {
    const { result } = renderHook(() => useRecordMeasurement(), { wrapper });
    answers = ['lost', 'ok', 'ok', 'ok'];
    await act(async () => {
      await expect(result.current.mutateAsync(reading(0.3))).rejects.toMatchObject({ code: 'offline' });
    });
    await act(async () => {
      await result.current.mutateAsync(reading(0.3));
    });
    // Taken: the same values sent after that are a second reading, with a key of their own; other values too.
    await act(async () => {
      await result.current.mutateAsync(reading(0.3));
    });
    await act(async () => {
      await result.current.mutateAsync(reading(0.31));
    });
    expect(keys).toHaveLength(4);
    for (const k of keys) expect(k).toMatch(IDEMPOTENCY_KEY);
    expect(keys[0]).toMatch(/^reading-/);
    expect(keys[1]).toBe(keys[0]);
    expect(new Set(keys).size).toBe(3);
  });

  it('is new when the values are changed before the reading is sent again', async () => {
    const { result } = renderHook(() => useRecordMeasurement(), { wrapper });
    answers = ['lost', 'ok'];
    await act(async () => {
      await expect(result.current.mutateAsync(reading(0.3))).rejects.toMatchObject({ code: 'offline' });
    });
    await act(async () => {
      await result.current.mutateAsync(reading(0.35));
    });
    expect(keys).toHaveLength(2);
    expect(keys[1]).not.toBe(keys[0]);
  });

  it('is the same on every try of one close-out until the server takes it', async () => {
    const { result } = renderHook(() => useCloseOutTicket(), { wrapper });
    answers = ['busy', 'lost', 'ok'];
    const closeout = { id: 12, found: { method: 'distance' as const, fromEnd: 'A' as const, distanceM: 104 }, cause: 'water-ingress' as const, workDone: 'New joint' };
    for (const expected of [{ status: 503 }, { code: 'offline' }]) {
      await act(async () => {
        await expect(result.current.mutateAsync(closeout)).rejects.toMatchObject(expected);
      });
    }
    await act(async () => {
      expect((await result.current.mutateAsync(closeout)).status).toBe('fixed');
    });
    expect(keys).toHaveLength(3);
    expect(keys[0]).toMatch(/^closeout-/);
    expect(new Set(keys).size).toBe(1);
  });
});
