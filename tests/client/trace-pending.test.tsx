import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { cleanup, render, screen } from '@testing-library/react';
import { http, HttpResponse } from 'msw';
import { setupServer } from 'msw/node';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { pendingPollInterval, PENDING_POLL_MS, useTrace } from '../../src/features/traces/api/get-trace';
import { AnalysisPending } from '../../src/features/traces/components/analysis-pending';
import { LIST_PENDING_POLL_MS, listPollInterval } from '../../src/features/traces/api/list-traces';
import type { TraceSummary } from '../../shared/schemas/traces';

/** The server's answers for trace 5, one per request: pending twice, then analysed. */
const answers: Array<Record<string, unknown>> = [];
let asked = 0;
const server = setupServer(
  http.get('*/api/traces/5', () => {
    asked += 1;
    return HttpResponse.json(answers[Math.min(asked, answers.length) - 1]);
  }),
);

beforeAll(() => server.listen({ onUnhandledRequest: 'error' }));
afterEach(() => {
  server.resetHandlers();
  cleanup();
});
afterAll(() => server.close());

const trace = (status: string, extra: object = {}) => ({
  id: 5,
  status,
  sizeBytes: 6_291_456,
  createdAt: '2026-12-02T07:00:00.000Z',
  originalName: 'long.csv',
  ...extra,
});

/** The trace page's polling and its pending notice, without the chart. */
function Probe() {
  const t = useTrace(5, undefined, 25).data;
  if (!t) return <p>loading</p>;
  return (
    <>
      <AnalysisPending trace={t} />
      <p data-testid="status">{t.status}</p>
      {t.status === 'ok' && <p>{t.analysis?.events.length} events</p>}
      {t.status === 'failed' && <p role="alert">{t.error?.message}</p>}
    </>
  );
}

function show() {
  const qc = new QueryClient({ defaultOptions: { queries: { retry: false } } });
  return render(
    <QueryClientProvider client={qc}>
      <Probe />
    </QueryClientProvider>,
  );
}

describe('a trace analysed in the background', () => {
  it('polls only while pending', () => {
    expect(pendingPollInterval('pending')).toBe(PENDING_POLL_MS);
    expect(pendingPollInterval('ok')).toBe(false);
    expect(pendingPollInterval('failed')).toBe(false);
    expect(pendingPollInterval(undefined)).toBe(false);
  });

  it('shows "Analysing…" while pending, asks again, and shows the result once analysed', async () => {
    asked = 0;
    answers.splice(
      0,
      answers.length,
      trace('pending', { analysis: null }),
      trace('pending', { analysis: null }),
      trace('ok', { analysis: { events: [{}, {}, {}] } }),
    );
    show();
    expect(await screen.findByText('Analysing…')).toBeTruthy();
    expect(screen.getByText(/6\.0 MB/)).toBeTruthy();
    expect(await screen.findByText('3 events', {}, { timeout: 10_000 })).toBeTruthy();
    expect(screen.getByTestId('status').textContent).toBe('ok');
    expect(screen.queryByText('Analysing…')).toBeNull();
    expect(asked).toBe(3);
  }, 20_000);

  it('shows the reason when the background analysis could not read the file', async () => {
    asked = 0;
    const reason = 'Line 1501: "about a volt" in voltage_V is not a number.';
    answers.splice(
      0,
      answers.length,
      trace('pending', { analysis: null }),
      trace('failed', { analysis: null, error: { code: 'BAD_NUMBER', message: reason, line: 1501, field: 'voltage_V' } }),
    );
    show();
    expect((await screen.findByRole('alert', {}, { timeout: 10_000 })).textContent).toBe(reason);
    expect(screen.queryByText('Analysing…')).toBeNull();
    expect(asked).toBe(2);
  }, 20_000);
});

describe('a list of traces with one still being analysed', () => {
  const row = (status: string) => ({ ...trace(status), status }) as unknown as TraceSummary;

  it('is asked for again while any row is pending, and not once every row has its result', () => {
    expect(listPollInterval([row('ok'), row('pending')])).toBe(LIST_PENDING_POLL_MS);
    expect(listPollInterval([row('ok'), row('failed')])).toBe(false);
    expect(listPollInterval([])).toBe(false);
    expect(listPollInterval(undefined)).toBe(false);
  });
});
