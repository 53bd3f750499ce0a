import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { CableReanalysisView } from '../../../../shared/schemas/cable-reanalysis';
import { api } from '../../../lib/api-client';

export const getLatestReanalysis = (cableId: number) => api<{ reanalysis: CableReanalysisView | null }>(`/api/cables/${cableId}/reanalyses/latest`);

export const getLatestReanalysisQueryOptions = (cableId: number) =>
  queryOptions({
    queryKey: ['cables', 'one', cableId, 'reanalysis'],
    queryFn: () => getLatestReanalysis(cableId),
    // Followed while it runs (on whichever instance takes its steps), then left alone.
    refetchInterval: (q) => (q.state.data?.reanalysis?.status === 'running' ? 1_500 : false),
  });

export function useLatestReanalysis(cableId: number) {
  return useQuery(getLatestReanalysisQueryOptions(cableId));
}

export const startReanalysis = (cableId: number) => api<CableReanalysisView>(`/api/cables/${cableId}/reanalyses`, { method: 'POST' });

export function useStartReanalysis(cableId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => startReanalysis(cableId),
    onSuccess: (reanalysis) => qc.setQueryData(getLatestReanalysisQueryOptions(cableId).queryKey, { reanalysis }),
  });
}
