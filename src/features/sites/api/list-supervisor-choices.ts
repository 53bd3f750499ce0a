import { queryOptions, useQuery } from '@tanstack/react-query';
import type { SupervisorSummary } from '../../../../shared/schemas/sites';
import { api } from '../../../lib/api-client';

export const listSupervisorChoices = () => api<SupervisorSummary[]>('/api/sites/supervisor-choices');

export const getSupervisorChoicesQueryOptions = () =>
  queryOptions({ queryKey: ['sites', 'supervisor-choices'], queryFn: listSupervisorChoices, staleTime: 60_000 });

export function useSupervisorChoices(enabled = true) {
  return useQuery({ ...getSupervisorChoicesQueryOptions(), enabled });
}
