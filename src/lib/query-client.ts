import { QueryClient } from '@tanstack/react-query';
import { ApiError } from './api-client';

export const queryClient = new QueryClient({
  defaultOptions: {
    queries: {
      staleTime: 30_000,
      // Field signal is poor: retry transient failures, never a 4xx.
      retry: (count, error) => !(error instanceof ApiError && error.status < 500) && count < 3,
      refetchOnWindowFocus: false,
    },
    mutations: {
      // A change sent without signal fails at once with "Could not reach Rholog", its form still filled in, rather
      // than waiting unseen behind a grey button to go out whenever the phone is next online (or never, if the page
      // is closed first). What is made to wait for the signal goes through the phone's outbox, which says so.
      networkMode: 'always',
    },
  },
});
