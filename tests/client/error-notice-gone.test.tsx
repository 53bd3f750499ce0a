import { cleanup, render, screen } from '@testing-library/react';
import { createMemoryRouter, RouterProvider } from 'react-router-dom';
import { afterEach, describe, expect, it } from 'vitest';
import { ErrorNotice } from '../../src/components/ui/notice';
import { ApiError } from '../../src/lib/api-client';

afterEach(cleanup);

function onPage(error: unknown) {
  const router = createMemoryRouter([{ path: '*', element: <ErrorNotice error={error} onRetry={() => undefined} /> }], {
    initialEntries: ['/tickets/99'],
  });
  render(<RouterProvider router={router} />);
}

describe('a page whose record could not be loaded', () => {
  it('offers the way back to today’s work when the record is not there, and no "Try again" that would only fail again', () => {
    onPage(new ApiError(404, 'not_found', 'Ticket 99 was not found.'));
    expect(screen.getByRole('alert').textContent).toContain('Ticket 99 was not found.');
    expect(screen.getByRole('link', { name: "Back to today's work" }).getAttribute('href')).toBe('/');
    expect(screen.queryByRole('button', { name: 'Try again' })).toBeNull();
  });

  it('offers to try again, not the way back, when the server itself failed', () => {
    onPage(new ApiError(503, 'database_busy', 'The database is busy. Try again in a moment.'));
    expect(screen.getByRole('button', { name: 'Try again' })).toBeTruthy();
    expect(screen.queryByRole('link', { name: "Back to today's work" })).toBeNull();
  });

  it('says only what went wrong for a refused form (no page to leave), and works outside the router', () => {
    render(<ErrorNotice error={new ApiError(404, 'not_found', 'Cable run 12 was not found.')} />);
    expect(screen.getByRole('alert').textContent).toBe('That did not workCable run 12 was not found.');
    expect(screen.queryByRole('link')).toBeNull();
  });
});
