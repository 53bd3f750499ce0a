import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { CableRunInput, CableRunUpdate, CableRunView } from '../../../../shared/schemas/sites';
import { api } from '../../../lib/api-client';

export const saveCableRun = ({ id, ...input }: (CableRunInput | (CableRunUpdate & { siteId: number })) & { id?: number }) =>
  id
    ? api<CableRunView>(`/api/cable-runs/${id}`, { method: 'PUT', body: input })
    : api<CableRunView>('/api/cable-runs', { method: 'POST', body: input });

export function useSaveCableRun() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: saveCableRun,
    onSuccess: () => Promise.all([qc.invalidateQueries({ queryKey: ['cable-runs'] }), qc.invalidateQueries({ queryKey: ['sites'] })]),
  });
}
