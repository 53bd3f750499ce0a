import { queryOptions, useQuery } from '@tanstack/react-query';
import type { SiteSummary } from '../../../../shared/schemas/sites';
import { api } from '../../../lib/api-client';

export const getSite = (id: number) => api<SiteSummary>(`/api/sites/${id}`);

export const getSiteQueryOptions = (id: number) => queryOptions({ queryKey: ['sites', 'one', id], queryFn: () => getSite(id) });

export function useSite(id: number) {
  return useQuery(getSiteQueryOptions(id));
}
