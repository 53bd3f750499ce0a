import { cleanup, fireEvent, screen } from '@testing-library/react';
import { http, HttpResponse } from 'msw';
import { setupServer } from 'msw/node';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { CableImportPage } from '../../src/app/routes/cable-import';
import { demoPlanner } from './support/fixtures';
import { renderApp } from './support/render';

const message =
  'Line 1: unknown columns "z0" (perhaps "z0_ohm"), "tolerance" (perhaps "vf_tolerance"). Needed: name, construction, dielectric, z0_ohm, vf, vf_tolerance, vf_source, vf_reference; the optional columns are in the import help.';
const server = setupServer(
  http.get('*/api/auth/csrf', () => HttpResponse.json({ csrfToken: 'token-1' })),
  http.post('*/api/cables/import/preview', () =>
    HttpResponse.json({ error: { code: 'csv_unreadable', message, fields: [{ field: 'file', line: 1, message }] } }, { status: 422 }),
  ),
);
beforeAll(() => server.listen({ onUnhandledRequest: 'error' }));
afterEach(cleanup);
afterAll(() => server.close());

describe('importing a cable library file the server cannot read', () => {
  it('shows the server’s whole message and says in the import step what to do, not “choose a file”', async () => {
    renderApp(<CableImportPage />, { me: demoPlanner });
    expect(screen.getByText('Choose a file to see the check.')).toBeTruthy();
    expect(screen.getByText(/^Needed columns: name, construction, dielectric, z0_ohm, vf, vf_tolerance, vf_source, vf_reference\. Optional: notes, /)).toBeTruthy();
    const file = new File(['name,z0,tolerance\nx,50,0.02\n'], 'bad.csv', { type: 'text/csv' });
    fireEvent.change(screen.getByLabelText('CSV file'), { target: { files: [file] } });
    expect((await screen.findByTestId('import-blocked')).textContent).toBe(
      'Nothing can be imported from this file: fix what the message beside it says, save the file and choose it again.',
    );
    expect(screen.getAllByText(message, { exact: false }).length).toBeGreaterThan(0);
    expect(screen.queryByText('Choose a file to see the check.')).toBeNull();
  });
});
