import { queryOptions, useQuery } from '@tanstack/react-query';
import type { DashboardView } from '../../../../shared/schemas/tickets';
import { api } from '../../../lib/api-client';

export const getDashboard = () => api<DashboardView>('/api/dashboard');

export const getDashboardQueryOptions = () => queryOptions({ queryKey: ['dashboard'], queryFn: getDashboard, refetchInterval: 30_000 });

export function useDashboard() {
  return useQuery(getDashboardQueryOptions());
}
