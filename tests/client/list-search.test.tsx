import { act, cleanup, fireEvent, screen, waitFor } from '@testing-library/react';
import { http, HttpResponse } from 'msw';
import { setupServer } from 'msw/node';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { FindingsPage } from '../../src/app/routes/findings';
import { TracesPage } from '../../src/app/routes/traces';
import { listedFinding, technicianMe } from './support/fixtures';
import { renderApp } from './support/render';

/** Every list request's query, in the order the page asked. */
const asked: URLSearchParams[] = [];

const finding = listedFinding;
const me = technicianMe;

const server = setupServer(
  http.get('*/api/auth/me', () => HttpResponse.json(me)),
  http.get('*/api/sites', () => HttpResponse.json({ items: [], total: 0, page: 1, pageSize: 100 })),
  http.get('*/api/findings', ({ request }) => {
    const p = new URL(request.url).searchParams;
    asked.push(p);
    const q = p.get('q') ?? '';
    if (q.trim().length > 100) {
      return HttpResponse.json(
        { error: { code: 'invalid_input', message: 'Some fields are not valid.', fields: [{ field: 'q', message: 'must be at most 100 characters' }] } },
        { status: 400 },
      );
    }
    if (q === 'nothing-here') return HttpResponse.json({ items: [], total: 0, page: 1, pageSize: 25 });
    const page = Number(p.get('page') ?? 1);
    return HttpResponse.json({ items: [finding(page * 100 + (q ? 1 : 0))], total: 60, page, pageSize: 25 });
  }),
  http.get('*/api/traces', ({ request }) => {
    const p = new URL(request.url).searchParams;
    asked.push(p);
    const from = p.get('from');
    const to = p.get('to');
    if (from && to && from > to) {
      return HttpResponse.json(
        { error: { code: 'invalid_input', message: 'Some fields are not valid.', fields: [{ field: 'to', message: 'must be the same day as "from" or later' }] } },
        { status: 400 },
      );
    }
    return HttpResponse.json({ items: [], total: 0, page: Number(p.get('page') ?? 1), pageSize: 25 });
  }),
  http.get('*/api/traces/archived', () => HttpResponse.json({ items: [], total: 0, page: 1, pageSize: 25 })),
);

beforeAll(() => server.listen({ onUnhandledRequest: 'error' }));
afterEach(() => {
  cleanup();
  asked.length = 0;
});
afterAll(() => server.close());

function show(element: React.ReactElement, url: string) {
  return renderApp(element, { me, url }).router!;
}

const lastAsked = () => asked[asked.length - 1]!;

describe('the findings search', () => {
  it('opens with the search from the address and asks the server for it', async () => {
    show(<FindingsPage />, '/findings?q=MH-3');
    const box = (await screen.findByLabelText('Search findings')) as HTMLInputElement;
    expect(box.value).toBe('MH-3');
    await screen.findByText('finding 101 route words');
    expect(asked.every((p) => p.get('q') === 'MH-3')).toBe(true);
  });

  it('puts typed text in the address after a pause, starts again at page 1, and says when nothing matches', async () => {
    const router = show(<FindingsPage />, '/findings');
    await screen.findByText('finding 100 route words');
    fireEvent.click(screen.getByRole('button', { name: 'Next' }));
    await screen.findByText('finding 200 route words');
    expect(lastAsked().get('page')).toBe('2');

    const box = screen.getByLabelText('Search findings');
    fireEvent.change(box, { target: { value: 'nothing' } });
    fireEvent.change(box, { target: { value: 'nothing-here' } });
    expect(await screen.findByText('No findings match “nothing-here”')).toBeTruthy();
    // one request for the finished text only, on page 1
    expect(asked.filter((p) => p.has('q')).map((p) => `${p.get('q')}@${p.get('page')}`)).toEqual(['nothing-here@1']);
    expect(router.state.location.search).toBe('?q=nothing-here');

    // back brings the unsearched second page's address back, and the box empties
    await act(() => router.navigate(-1));
    await waitFor(() => expect((screen.getByLabelText('Search findings') as HTMLInputElement).value).toBe(''));
    expect(router.state.location.search).toBe('');
  });

  it('clears with its own button', async () => {
    const router = show(<FindingsPage />, '/findings?q=nothing-here');
    expect(await screen.findByText('No findings match “nothing-here”')).toBeTruthy();
    fireEvent.click(screen.getByRole('button', { name: 'Clear the search' }));
    await screen.findByText('finding 100 route words');
    expect((screen.getByLabelText('Search findings') as HTMLInputElement).value).toBe('');
    expect(router.state.location.search).toBe('');
    expect(screen.queryByRole('button', { name: 'Clear the search' })).toBeNull();
  });

  it("shows the server's refusal of a search over 100 characters under the field", async () => {
    show(<FindingsPage />, `/findings?q=${'x'.repeat(101)}`);
    const message = await screen.findByText('must be at most 100 characters');
    const box = screen.getByLabelText('Search findings');
    expect(box.getAttribute('aria-invalid')).toBe('true');
    expect(box.getAttribute('aria-describedby')).toBe(message.id);
  });
});

describe('the traces search', () => {
  it('asks for file names matching the typed text and says when none match', async () => {
    const router = show(<TracesPage />, '/traces');
    const box = await screen.findByLabelText('Search traces');
    fireEvent.change(box, { target: { value: 'hn-c2' } });
    expect(await screen.findByText('No traces match “hn-c2”')).toBeTruthy();
    expect(lastAsked().get('q')).toBe('hn-c2');
    expect(lastAsked().get('page')).toBe('1');
    expect(router.state.location.search).toBe('?q=hn-c2');
  });
});

describe('the traces date range', () => {
  it('keeps To from before From, and shows a refused range under To instead of an error box', async () => {
    show(<TracesPage />, '/traces');
    const from = (await screen.findByLabelText('From')) as HTMLInputElement;
    fireEvent.change(from, { target: { value: '2026-12-03' } });
    const to = screen.getByLabelText('To') as HTMLInputElement;
    expect(to.getAttribute('min')).toBe('2026-12-03');
    // A typed date can still go under the picker's limit: the server's refusal is shown at the field.
    fireEvent.change(to, { target: { value: '2026-12-01' } });
    const message = await screen.findByText('must be the same day as "from" or later');
    expect(to.getAttribute('aria-invalid')).toBe('true');
    expect(to.getAttribute('aria-describedby')).toBe(message.id);
    expect(from.getAttribute('max')).toBe('2026-12-01');
    expect(screen.queryByText('Some fields are not valid.')).toBeNull();
  });
});

describe('the traces filters on a phone', () => {
  it('fold behind one button that says how many are set, and open with it', async () => {
    show(<TracesPage />, '/traces');
    const toggle = await screen.findByTestId('trace-filters-toggle');
    const filters = document.getElementById('trace-filters')!;
    expect(toggle.textContent).toBe('Filters');
    expect(toggle.getAttribute('aria-expanded')).toBe('false');
    expect(filters.className.split(' ')).toContain('hidden');
    fireEvent.click(toggle);
    expect(toggle.textContent).toBe('Hide the filters');
    expect(toggle.getAttribute('aria-expanded')).toBe('true');
    expect(filters.className.split(' ')).not.toContain('hidden');
    fireEvent.change(screen.getByLabelText('From'), { target: { value: '2026-12-01' } });
    fireEvent.click(toggle);
    expect(toggle.textContent).toBe('Filters (1 set)');
    expect(filters.className.split(' ')).toContain('hidden');
  });
});
