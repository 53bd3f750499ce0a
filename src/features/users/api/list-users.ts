import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { Page, PublicUser } from '../../../../shared/schemas/users';
import { api } from '../../../lib/api-client';

export interface ListUsersParams {
  q?: string;
  page: number;
}

export const listUsers = (p: ListUsersParams) => api<Page<PublicUser>>('/api/users', { query: { q: p.q, page: p.page } });

export const getUsersQueryOptions = (p: ListUsersParams) =>
  queryOptions({ queryKey: ['users', p], queryFn: () => listUsers(p), placeholderData: keepPreviousData });

export function useUsers(p: ListUsersParams) {
  return useQuery(getUsersQueryOptions(p));
}
