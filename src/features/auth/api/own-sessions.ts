import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';

/** One of the signed-in person's own sessions, as `GET /api/auth/sessions` lists it. */
export interface OwnSession {
  id: string;
  signedInAt: string | null;
  lastSeenAt: string | null;
  device: string | null;
  address: string | null;
  current: boolean;
}

export const getOwnSessions = () => api<{ sessions: OwnSession[]; cap: number }>('/api/auth/sessions');

export const getOwnSessionsQueryOptions = () => queryOptions({ queryKey: ['auth', 'sessions'], queryFn: getOwnSessions });

export function useOwnSessions() {
  return useQuery(getOwnSessionsQueryOptions());
}

export const endOwnSession = (id: string) =>
  api<{ ok: true }>(`/api/auth/sessions/${encodeURIComponent(id)}`, { method: 'DELETE' });

export function useEndOwnSession() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: endOwnSession,
    onSettled: () => qc.invalidateQueries({ queryKey: getOwnSessionsQueryOptions().queryKey }),
  });
}
