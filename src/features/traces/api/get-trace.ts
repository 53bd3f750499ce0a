import { queryOptions, useQuery } from '@tanstack/react-query';
import type { TraceDetail, TraceStatus } from '../../../../shared/schemas/traces';
import { api } from '../../../lib/api-client';

/** How often a trace still being analysed in the background ('pending') is asked for again. */
export const PENDING_POLL_MS = 2_000;

/** The polling interval for a trace in this state: only a pending trace is polled, until its analysis ends. */
export const pendingPollInterval = (status: TraceStatus | undefined, everyMs = PENDING_POLL_MS): number | false =>
  status === 'pending' ? everyMs : false;

export const getTrace = (id: number, compareTo?: number) => api<TraceDetail>(`/api/traces/${id}`, { query: { compareTo } });

export const getTraceQueryOptions = (id: number, compareTo?: number, pollMs = PENDING_POLL_MS) =>
  queryOptions({
    queryKey: ['traces', 'one', id, { compareTo }],
    queryFn: () => getTrace(id, compareTo),
    refetchInterval: (q) => pendingPollInterval(q.state.data?.status, pollMs),
  });

export function useTrace(id: number, compareTo?: number, pollMs?: number) {
  return useQuery(getTraceQueryOptions(id, compareTo, pollMs));
}
