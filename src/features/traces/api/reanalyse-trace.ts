import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { TraceDetail } from '../../../../shared/schemas/traces';
import { api } from '../../../lib/api-client';

/** Analyse a stored trace again with the cable library's current values; answers the new trace. */
export const reanalyseTrace = (id: number) => api<TraceDetail>(`/api/traces/${id}/reanalyse`, { method: 'POST' });

export function useReanalyseTrace() {
  const qc = useQueryClient();
  return useMutation({ mutationFn: reanalyseTrace, onSuccess: () => qc.invalidateQueries({ queryKey: ['traces'] }) });
}
