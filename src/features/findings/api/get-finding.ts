import { queryOptions, useQuery } from '@tanstack/react-query';
import type { FindingView } from '../../../../shared/schemas/findings';
import { api } from '../../../lib/api-client';

export const getFinding = (id: number) => api<FindingView>(`/api/findings/${id}`);

export const getFindingQueryOptions = (id: number) => queryOptions({ queryKey: ['findings', 'one', id], queryFn: () => getFinding(id) });

export function useFinding(id: number) {
  return useQuery(getFindingQueryOptions(id));
}
