import { queryOptions, useQuery } from '@tanstack/react-query';
import type { PublicUser } from '../../../../shared/schemas/users';
import { api, ApiError } from '../../../lib/api-client';

export async function getMe(): Promise<PublicUser | null> {
  try {
    return await api<PublicUser>('/api/auth/me', { allowUnauthenticated: true });
  } catch (err) {
    if (err instanceof ApiError && err.status === 401) return null;
    throw err;
  }
}

export const getMeQueryOptions = () => queryOptions({ queryKey: ['auth', 'me'], queryFn: getMe, staleTime: 60_000 });

export function useMe() {
  return useQuery(getMeQueryOptions());
}
