import { queryOptions, useQuery } from '@tanstack/react-query';
import type { TraceDetail } from '../../../../shared/schemas/traces';
import { api } from '../../../lib/api-client';

export const getTrace = (id: number, compareTo?: number) => api<TraceDetail>(`/api/traces/${id}`, { query: { compareTo } });

export const getTraceQueryOptions = (id: number, compareTo?: number) =>
  queryOptions({ queryKey: ['traces', 'one', id, { compareTo }], queryFn: () => getTrace(id, compareTo) });

export function useTrace(id: number, compareTo?: number) {
  return useQuery(getTraceQueryOptions(id, compareTo));
}
