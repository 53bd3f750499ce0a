import { queryOptions, useQuery } from '@tanstack/react-query';
import type { CableRunView } from '../../../../shared/schemas/sites';
import { api } from '../../../lib/api-client';

export const getCableRun = (id: number) => api<CableRunView>(`/api/cable-runs/${id}`);

export const getCableRunQueryOptions = (id: number) => queryOptions({ queryKey: ['cable-runs', 'one', id], queryFn: () => getCableRun(id) });

export function useCableRun(id: number, enabled = true) {
  return useQuery({ ...getCableRunQueryOptions(id), enabled });
}
