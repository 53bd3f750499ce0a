import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { SiteSummary } from '../../../../shared/schemas/sites';
import type { Page } from '../../../../shared/schemas/users';
import { api } from '../../../lib/api-client';

export interface ListSitesParams {
  q?: string;
  page?: number;
  pageSize?: number;
}

export const listSites = (p: ListSitesParams) => api<Page<SiteSummary>>('/api/sites', { query: { ...p } });

export const getSitesQueryOptions = (p: ListSitesParams) =>
  queryOptions({ queryKey: ['sites', p], queryFn: () => listSites(p), placeholderData: keepPreviousData });

export function useSites(p: ListSitesParams) {
  return useQuery(getSitesQueryOptions(p));
}
