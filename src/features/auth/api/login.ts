import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { PublicUser } from '../../../../shared/schemas/users';
import { api, setCsrfToken } from '../../../lib/api-client';
import { getMeQueryOptions } from './get-me';

export async function login(input: { email: string; password: string }) {
  const res = await api<{ user: PublicUser; csrfToken: string }>('/api/auth/login', {
    method: 'POST',
    body: input,
    allowUnauthenticated: true,
  });
  setCsrfToken(res.csrfToken);
  return res.user;
}

export function useLogin() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: login,
    onSuccess: (user) => {
      qc.clear();
      qc.setQueryData(getMeQueryOptions().queryKey, user);
    },
  });
}
