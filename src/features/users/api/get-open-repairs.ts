import { queryOptions, useQuery } from '@tanstack/react-query';
import type { OpenRepairsView } from '../../../../shared/schemas/users';
import { api } from '../../../lib/api-client';

export const getOpenRepairs = (userId: number) => api<OpenRepairsView>(`/api/users/${userId}/open-repairs`);

export const getOpenRepairsQueryOptions = (userId: number) => queryOptions({ queryKey: ['users', userId, 'open-repairs'], queryFn: () => getOpenRepairs(userId) });

/** The person's open repair tickets, fetched only while `enabled` (the deactivation dialog is open). */
export function useOpenRepairs(userId: number, enabled: boolean) {
  return useQuery({ ...getOpenRepairsQueryOptions(userId), enabled });
}
