import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import type { OwnSession } from '../../../../shared/schemas/own-sessions';

export type { OwnSession };

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
