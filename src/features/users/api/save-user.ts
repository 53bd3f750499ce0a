import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { Role } from '../../../../shared/auth/permissions';
import type { PublicUser } from '../../../../shared/schemas/users';
import { api } from '../../../lib/api-client';

export interface NewUser {
  email: string;
  name: string;
  role: Role;
}
type WithPassword = { user: PublicUser; temporaryPassword: string };

export const createUser = (input: NewUser) => api<WithPassword>('/api/users', { method: 'POST', body: input });
export const updateUser = ({ id, ...patch }: { id: number; role?: Role; active?: boolean; name?: string }) =>
  api<PublicUser & { openTicketCount: number }>(`/api/users/${id}`, { method: 'PATCH', body: patch });
export const resetUserPassword = (id: number) => api<WithPassword>(`/api/users/${id}/reset-password`, { method: 'POST' });
export const handOverRepairs = ({ id, toUserId }: { id: number; toUserId: number }) =>
  api<{ moved: number[]; to: { id: number; name: string } }>(`/api/users/${id}/hand-over-repairs`, { method: 'POST', body: { toUserId } });

function useUserMutation<TIn, TOut>(fn: (input: TIn) => Promise<TOut>) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: fn,
    onSuccess: () => Promise.all([qc.invalidateQueries({ queryKey: ['users'] }), qc.invalidateQueries({ queryKey: ['tickets'] })]),
  });
}

export const useCreateUser = () => useUserMutation(createUser);
export const useUpdateUser = () => useUserMutation(updateUser);
export const useResetUserPassword = () => useUserMutation(resetUserPassword);
export const useHandOverRepairs = () => useUserMutation(handOverRepairs);
