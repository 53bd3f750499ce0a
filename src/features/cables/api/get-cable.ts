import { queryOptions, useQuery } from '@tanstack/react-query';
import type { CableTypeView } from '../../../../shared/schemas/cables';
import { api } from '../../../lib/api-client';

export const getCable = (id: number) => api<CableTypeView>(`/api/cables/${id}`);

export const getCableQueryOptions = (id: number) => queryOptions({ queryKey: ['cables', 'one', id], queryFn: () => getCable(id) });

export function useCable(id: number) {
  return useQuery(getCableQueryOptions(id));
}
