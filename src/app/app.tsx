import { useState } from 'react';
import { RouterProvider } from 'react-router-dom';
import { setUnauthenticatedHandler } from '../lib/api-client';
import { queryClient } from '../lib/query-client';
import { getMeQueryOptions } from '../features/auth/api/get-me';
import { paths } from './paths';
import { Providers } from './providers';
import { createRouter } from './router';

export function App() {
  const [router] = useState(() => {
    const r = createRouter();
    // A 401 from any call means the session ended (expired, or the account was deactivated).
    setUnauthenticatedHandler(() => {
      queryClient.setQueryData(getMeQueryOptions().queryKey, null);
      const here = window.location.pathname + window.location.search;
      if (!here.startsWith(paths.signIn.pattern)) void r.navigate(paths.signIn.to(here));
    });
    return r;
  });
  return (
    <Providers>
      <RouterProvider router={router} />
    </Providers>
  );
}
