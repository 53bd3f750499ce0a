import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';

export interface AssignableTechnician {
  id: number;
  name: string;
  email: string;
}

export const listAssignable = () => api<AssignableTechnician[]>('/api/users/assignable');

export const getAssignableQueryOptions = () => queryOptions({ queryKey: ['users', 'assignable'], queryFn: listAssignable, staleTime: 60_000 });

export function useAssignable(enabled = true) {
  return useQuery({ ...getAssignableQueryOptions(), enabled });
}
