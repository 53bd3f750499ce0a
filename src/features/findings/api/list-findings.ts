import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { FindingListQuery, FindingView } from '../../../../shared/schemas/findings';
import type { Page } from '../../../../shared/schemas/users';
import { api } from '../../../lib/api-client';

export const listFindings = (p: FindingListQuery) => api<Page<FindingView>>('/api/findings', { query: { ...p } });

export const getFindingsQueryOptions = (p: FindingListQuery) =>
  queryOptions({ queryKey: ['findings', p], queryFn: () => listFindings(p), placeholderData: keepPreviousData });

export function useFindings(p: FindingListQuery) {
  return useQuery(getFindingsQueryOptions(p));
}
