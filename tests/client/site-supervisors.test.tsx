import { cleanup, screen } from '@testing-library/react';
import { http, HttpResponse } from 'msw';
import { setupServer } from 'msw/node';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { SitePage } from '../../src/app/routes/site';
import { renderApp } from './support/render';

const planner = {
  id: 4,
  email: 'pat.plan@example.com',
  name: 'Pat Plan',
  role: 'planner',
  active: true,
  mustChangePassword: false,
  unitPreference: 'm',
};

let supervisors: Array<{ id: number; name: string; email: string; active: boolean }> = [];
const server = setupServer(
  http.get('*/api/sites/7', () =>
    HttpResponse.json({
      id: 7,
      name: 'Oakhollow cabinet row',
      address: 'Oakhollow Road',
      latitude: null,
      longitude: null,
      accessNotes: null,
      supervisors,
      cableRunCount: 0,
      openFindingCount: 0,
    }),
  ),
  http.get('*/api/cable-runs/cable-type-choices', () => HttpResponse.json([])),
  http.get('*/api/cable-runs', () => HttpResponse.json({ items: [], total: 0, page: 1, pageSize: 200 })),
);

beforeAll(() => server.listen({ onUnhandledRequest: 'error' }));
afterEach(cleanup);
afterAll(() => server.close());

function renderSite() {
  renderApp(<SitePage />, { me: planner, path: '/sites/:siteId', url: '/sites/7' });
}

describe('who a site’s confirmed findings are e-mailed to', () => {
  it('says every supervisor gets them when nobody is named, as the finding e-mail does (not that nobody does)', async () => {
    supervisors = [];
    renderSite();
    const said = await screen.findByTestId('site-mail-fallback');
    expect(said.textContent).toBe('Nobody named yet: a finding confirmed here is e-mailed to every supervisor.');
    expect(screen.queryByText(/reach no one/)).toBeNull();
  });

  it('says the same when the only one named no longer supervises, and names nobody when one does', async () => {
    supervisors = [{ id: 9, name: 'Old Hand', email: 'old.hand@example.com', active: false }];
    renderSite();
    expect((await screen.findByTestId('site-mail-fallback')).textContent).toBe(
      'None of them gets e-mail now: a finding confirmed here is e-mailed to every supervisor.',
    );
    cleanup();

    supervisors = [{ id: 3, name: 'Maren Holt', email: 'supervisor@example.com', active: true }];
    renderSite();
    await screen.findByText('supervisor@example.com');
    expect(screen.queryByTestId('site-mail-fallback')).toBeNull();
  });
});
