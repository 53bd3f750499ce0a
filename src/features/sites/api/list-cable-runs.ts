import { queryOptions, useQuery } from '@tanstack/react-query';
import type { CableRunView } from '../../../../shared/schemas/sites';
import type { Page } from '../../../../shared/schemas/users';
import { api } from '../../../lib/api-client';

export const listCableRuns = (p: { siteId?: number }) => api<Page<CableRunView>>('/api/cable-runs', { query: { siteId: p.siteId, pageSize: 200 } });

export const getCableRunsQueryOptions = (p: { siteId?: number }) =>
  queryOptions({ queryKey: ['cable-runs', p], queryFn: () => listCableRuns(p) });

export function useCableRuns(p: { siteId?: number }, enabled = true) {
  return useQuery({ ...getCableRunsQueryOptions(p), enabled });
}
