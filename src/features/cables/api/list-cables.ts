import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { CableSort, CableTypeView } from '../../../../shared/schemas/cables';
import type { Page } from '../../../../shared/schemas/users';
import { api } from '../../../lib/api-client';

export interface ListCablesParams {
  q?: string;
  page: number;
  pageSize?: number;
  sort: CableSort;
  dir: 'asc' | 'desc';
}

export const listCables = (p: ListCablesParams) =>
  api<Page<CableTypeView>>('/api/cables', { query: { q: p.q, page: p.page, pageSize: p.pageSize, sort: p.sort, dir: p.dir } });

export const getCablesQueryOptions = (p: ListCablesParams) =>
  queryOptions({ queryKey: ['cables', 'list', p], queryFn: () => listCables(p), placeholderData: keepPreviousData });

export function useCables(p: ListCablesParams) {
  return useQuery(getCablesQueryOptions(p));
}
