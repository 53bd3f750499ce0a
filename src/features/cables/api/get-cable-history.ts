import { queryOptions, useQuery } from '@tanstack/react-query';
import type { CableTypeChangeView } from '../../../../shared/schemas/cables';
import { api } from '../../../lib/api-client';

export const getCableHistory = (id: number) => api<CableTypeChangeView[]>(`/api/cables/${id}/history`);

export const getCableHistoryQueryOptions = (id: number) =>
  queryOptions({ queryKey: ['cables', 'one', id, 'history'], queryFn: () => getCableHistory(id) });

export function useCableHistory(id: number) {
  return useQuery(getCableHistoryQueryOptions(id));
}
