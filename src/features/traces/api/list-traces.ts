import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { TraceListQuery, TraceSummary } from '../../../../shared/schemas/traces';
import type { Page } from '../../../../shared/schemas/users';
import { api } from '../../../lib/api-client';

export const listTraces = (p: TraceListQuery) => api<Page<TraceSummary>>('/api/traces', { query: { ...p } });

/** How often a list showing a trace still being analysed in the background is asked for again. */
export const LIST_PENDING_POLL_MS = 4_000;

/** A list is polled only while one of its rows is pending, so it says "analysed" soon after the analysis ends. */
export const listPollInterval = (items: TraceSummary[] | undefined, everyMs = LIST_PENDING_POLL_MS): number | false =>
  items?.some((t) => t.status === 'pending') ? everyMs : false;

export const getTracesQueryOptions = (p: TraceListQuery) =>
  queryOptions({
    queryKey: ['traces', p],
    queryFn: () => listTraces(p),
    placeholderData: keepPreviousData,
    refetchInterval: (q) => listPollInterval(q.state.data?.items),
  });

export function useTraces(p: TraceListQuery) {
  return useQuery(getTracesQueryOptions(p));
}
