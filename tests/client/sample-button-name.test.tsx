import { cleanup, fireEvent, screen, waitFor } from '@testing-library/react';
import { http, HttpResponse } from 'msw';
import { setupServer } from 'msw/node';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import type { SampleTrace } from '../../shared/schemas/traces';
import { SampleTraces } from '../../src/features/traces/components/sample-traces';
import { renderApp } from './support/render';

const csv = 'time_ns,voltage_V\n0,0.50\n10,0.50\n20,1.00\n';
let release: (() => void) | null = null;
const server = setupServer(
  http.get('*/api/sample-traces/:file', async ({ params }) => {
    await new Promise<void>((resolve) => (release = resolve));
    return params.file === 'oakhollow-data-link-short.csv' ? new HttpResponse(csv, { headers: { 'content-type': 'text/csv' } }) : new HttpResponse(null, { status: 404 });
  }),
);
beforeAll(() => server.listen({ onUnhandledRequest: 'error' }));
afterEach(() => {
  cleanup();
  release = null;
});
afterAll(() => server.close());

const sample = (file: string, over: Partial<SampleTrace> = {}): SampleTrace => ({
  file,
  title: 'A short on a data link',
  sizeBytes: 41_000,
  siteId: 3,
  siteName: 'Oakhollow cabinet row',
  cableRunId: 4,
  cableRunName: 'Data link OH-D1',
  end: 'A',
  endLabel: 'Cabinet 1',
  triedAsTraceId: null,
  ...over,
});

describe('the sample buttons, as a screen reader or a voice command finds them', () => {
  it('names each button by its own words followed by its file, and keeps that while fetching', async () => {
    const tried: Array<[string, string]> = [];
    renderApp(
      <SampleTraces
        samples={[sample('oakhollow-data-link-short.csv'), sample('brookfold-telemetry-open.csv', { title: 'An open on a telemetry pair' })]}
        onTry={(s, f) => void f.text().then((t) => tried.push([s.file, t]))}
        traceLink={(id) => `/traces/${id}`}
      />,
    );
    const buttons = await screen.findAllByRole('button');
    expect(buttons.map((b) => b.textContent)).toEqual(['Try this sample oakhollow-data-link-short.csv', 'Try this sample brookfold-telemetry-open.csv']);
    // The accessible name starts with the words a sighted user reads on it, and carries no aria-label of other words.
    const first = screen.getByRole('button', { name: 'Try this sample oakhollow-data-link-short.csv' });
    expect(first.getAttribute('aria-label')).toBeNull();
    expect(first.querySelector('.sr-only')?.textContent).toBe('oakhollow-data-link-short.csv');
    const links = screen.getAllByRole('link', { name: /^Download the CSV / });
    expect(links.map((a) => a.getAttribute('href'))).toEqual(['/api/sample-traces/oakhollow-data-link-short.csv', '/api/sample-traces/brookfold-telemetry-open.csv']);

    fireEvent.click(first);
    const busy = await screen.findByRole('button', { name: 'Fetching… oakhollow-data-link-short.csv' });
    expect(busy.hasAttribute('disabled')).toBe(true);
    await waitFor(() => expect(release).not.toBeNull());
    release!();
    await waitFor(() => expect(tried).toEqual([['oakhollow-data-link-short.csv', csv]]));
    expect(screen.getByRole('button', { name: 'Try this sample oakhollow-data-link-short.csv' }).hasAttribute('disabled')).toBe(false);
  });
});
