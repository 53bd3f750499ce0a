import { cleanup, fireEvent, screen, within } from '@testing-library/react';
import { http, HttpResponse } from 'msw';
import { setupServer } from 'msw/node';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { setCsrfToken } from '../../src/lib/api-client';
import { ReanalysisPanel } from '../../src/features/cables/components/reanalysis-panel';
import type { CableReanalysisView } from '../../shared/schemas/cable-reanalysis';
import { renderApp } from './support/render';

const base: CableReanalysisView = {
  id: 7,
  cableTypeId: 3,
  cableTypeRevision: 4,
  vf: 0.7,
  status: 'running',
  requestedBy: { id: 2, name: 'Pat Plan' },
  startedAt: '2026-12-02T05:00:00.000Z',
  finishedAt: null,
  traceTotal: 40,
  tracesDone: 0,
  tracesOk: 0,
  tracesFailed: 0,
  tracesSkipped: 0,
  findings: 0,
  findingsMoved: 0,
  findingsUnmatched: 0,
  movedThresholdM: 0.05,
  maxShiftM: null,
  meanShiftM: null,
  skipped: [],
};

const latest = { current: null as CableReanalysisView | null };
let posted = 0;
const server = setupServer(
  http.get('*/api/auth/csrf', () => HttpResponse.json({ csrfToken: 'token-1' })),
  http.get('*/api/cables/3/reanalyses/latest', () => HttpResponse.json({ reanalysis: latest.current })),
  http.post('*/api/cables/3/reanalyses', () => {
    posted += 1;
    latest.current = { ...base, tracesDone: 12 };
    return HttpResponse.json(latest.current, { status: 202 });
  }),
);

beforeAll(() => server.listen({ onUnhandledRequest: 'error' }));
afterEach(() => {
  server.resetHandlers();
  cleanup();
  setCsrfToken(null);
});
afterAll(() => server.close());

function show(canStart: boolean) {
  return renderApp(<ReanalysisPanel cableId={3} revision={4} unit="m" canStart={canStart} />, { router: false });
}

describe('the cable page re-analysis panel', () => {
  it('starts a run and shows its progress, with the button held while it runs', async () => {
    latest.current = null;
    show(true);
    fireEvent.click(await screen.findByRole('button', { name: 'Analyse all traces again' }));
    const bar = await screen.findByRole('progressbar', { name: 'Traces analysed again' });
    expect(posted).toBe(1);
    expect(bar.getAttribute('aria-valuenow')).toBe('12');
    expect(bar.getAttribute('aria-valuemax')).toBe('40');
    expect(screen.getByText('12 of 40 traces')).toBeTruthy();
    expect((screen.getByRole('button', { name: 'Running…' }) as HTMLButtonElement).disabled).toBe(true);
  }, 20_000);

  it('sums up a finished run: traces, findings moved and by how much, with a caution before digging', async () => {
    latest.current = {
      ...base,
      status: 'done',
      finishedAt: '2026-12-02T05:03:00.000Z',
      tracesDone: 40,
      tracesOk: 37,
      tracesFailed: 2,
      tracesSkipped: 1,
      findings: 15,
      findingsMoved: 12,
      findingsUnmatched: 1,
      maxShiftM: 9.09,
      meanShiftM: 6.26,
    };
    show(false);
    const summary = await screen.findByTestId('cable-reanalysis-summary');
    expect(within(summary).getByText(/37 analysed again, 2 unreadable this time, 1 skipped/)).toBeTruthy();
    expect(within(summary).getByText(/12 of 15 moved by .* or more; 1 no longer found/)).toBeTruthy();
    expect(within(summary).getByText(/up to 9\.09 m, 6\.26 m on average/)).toBeTruthy();
    expect(screen.getByText(/check open tickets on these runs before anyone digs/)).toBeTruthy();
    expect(screen.queryByRole('button')).toBeNull();
  });
});
