import { queryOptions, useQuery } from '@tanstack/react-query';
import type { UnticketedFinding } from '../../../../shared/schemas/tickets';
import { api } from '../../../lib/api-client';

export const listUnticketedFindings = () => api<UnticketedFinding[]>('/api/tickets/unticketed-findings');

export const getUnticketedFindingsQueryOptions = () => queryOptions({ queryKey: ['tickets', 'unticketed-findings'], queryFn: listUnticketedFindings });

export function useUnticketedFindings(enabled = true) {
  return useQuery({ ...getUnticketedFindingsQueryOptions(), enabled });
}
