import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { TraceListQuery, TraceSummary } from '../../../../shared/schemas/traces';
import type { Page } from '../../../../shared/schemas/users';
import { api } from '../../../lib/api-client';

export const listTraces = (p: TraceListQuery) => api<Page<TraceSummary>>('/api/traces', { query: { ...p } });

export const getTracesQueryOptions = (p: TraceListQuery) =>
  queryOptions({ queryKey: ['traces', p], queryFn: () => listTraces(p), placeholderData: keepPreviousData });

export function useTraces(p: TraceListQuery) {
  return useQuery(getTracesQueryOptions(p));
}
