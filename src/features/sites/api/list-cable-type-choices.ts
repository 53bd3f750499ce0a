import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';

export interface CableTypeChoice {
  id: number;
  name: string;
  vf: number;
  vfTolerance: number;
  z0Ohm: number;
}

export const listCableTypeChoices = () => api<CableTypeChoice[]>('/api/cable-runs/cable-type-choices');

export const getCableTypeChoicesQueryOptions = () =>
  queryOptions({ queryKey: ['cable-runs', 'cable-type-choices'], queryFn: listCableTypeChoices, staleTime: 60_000 });

export function useCableTypeChoices() {
  return useQuery(getCableTypeChoicesQueryOptions());
}
