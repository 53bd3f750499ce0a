import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { PublicUser } from '../../../../shared/schemas/users';
import { api } from '../../../lib/api-client';
import { getMeQueryOptions } from './get-me';

export const updateMe = (input: { unitPreference: 'm' | 'ft' }) =>
  api<PublicUser>('/api/auth/me', { method: 'PATCH', body: input });

export function useUpdateMe() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: updateMe,
    onSuccess: (user) => qc.setQueryData(getMeQueryOptions().queryKey, user),
  });
}

export const changePassword = (input: { currentPassword: string; newPassword: string }) =>
  api<PublicUser>('/api/auth/password', { method: 'POST', body: input });

export function useChangePassword() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: changePassword,
    onSuccess: (user) => qc.setQueryData(getMeQueryOptions().queryKey, user),
  });
}
