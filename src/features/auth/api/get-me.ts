import { queryOptions, useQuery } from '@tanstack/react-query';
import type { PublicUser } from '../../../../shared/schemas/users';
import { api, ApiError } from '../../../lib/api-client';
import { deviceDb, rememberedUser } from '../../offline/device-db';

export async function getMe(): Promise<PublicUser | null> {
  try {
    return await api<PublicUser>('/api/auth/me', { allowUnauthenticated: true });
  } catch (err) {
    if (err instanceof ApiError && err.status === 401) return null;
    // No network: the person last signed in on this phone carries on with what the phone keeps;
    // the server checks the sign-in again before anything is sent.
    if (err instanceof ApiError && err.status === 0) {
      const kept = await rememberedUser(await deviceDb()).catch(() => null);
      if (kept) return kept.user;
    }
    throw err;
  }
}

// 'always': the check runs without a network too (the query library would otherwise wait for one), so the phone opens offline.
export const getMeQueryOptions = () => queryOptions({ queryKey: ['auth', 'me'], queryFn: getMe, staleTime: 60_000, networkMode: 'always' });

export function useMe() {
  return useQuery(getMeQueryOptions());
}
