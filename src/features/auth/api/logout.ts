import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api, setCsrfToken } from '../../../lib/api-client';
import { getMeQueryOptions } from './get-me';

export async function logout() {
  const res = await api<{ csrfToken: string }>('/api/auth/logout', { method: 'POST', allowUnauthenticated: true });
  setCsrfToken(res.csrfToken);
}

export function useLogout() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: logout,
    onSuccess: () => {
      qc.clear();
      qc.setQueryData(getMeQueryOptions().queryKey, null);
    },
  });
}
