import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { render } from '@testing-library/react';
import type { ReactElement } from 'react';
import { createMemoryRouter, RouterProvider } from 'react-router-dom';

export interface RenderOptions {
  /** The signed-in user, as the signed-in layout puts it in the query cache; nobody when left out. */
  me?: unknown;
  /** The route pattern the element is mounted at, for pages that read their URL's parameters. */
  path?: string;
  /** The address the page is opened at. */
  url?: string;
  /** Mount the element under a memory router (the default), or bare, for a component that needs none. */
  router?: boolean;
}

/**
 * Render a page or component as the app does: with its own query client (no retries, so a failed
 * request shows at once) and, unless told otherwise, under a memory router at `url`.
 */
export function renderApp(element: ReactElement, { me, path = '*', url = '/', router = true }: RenderOptions = {}) {
  const qc = new QueryClient({ defaultOptions: { queries: { retry: false }, mutations: { retry: false } } });
  if (me !== undefined) qc.setQueryData(['auth', 'me'], me);
  const memory = router ? createMemoryRouter([{ path, element }], { initialEntries: [url] }) : null;
  const result = render(
    <QueryClientProvider client={qc}>{memory ? <RouterProvider router={memory} /> : element}</QueryClientProvider>,
  );
  return { ...result, qc, router: memory };
}
