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
  },
});
