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

function useUserMutation<TIn, TOut>(fn: (input: TIn) => Promise<TOut>) {
  const qc = useQueryClient();
  return useMutation({ mutationFn: fn, onSuccess: () => qc.invalidateQueries({ queryKey: ['users'] }) });
}

export const useCreateUser = () => useUserMutation(createUser);
export const useUpdateUser = () => useUserMutation(updateUser);
export const useResetUserPassword = () => useUserMutation(resetUserPassword);
