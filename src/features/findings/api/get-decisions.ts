import { queryOptions, useQuery } from '@tanstack/react-query';
import type { FindingDecisionView } from '../../../../shared/schemas/finding-decisions';
import { api } from '../../../lib/api-client';

export const getFindingDecisions = (findingId: number) => api<FindingDecisionView[]>(`/api/findings/${findingId}/decisions`);

export const getFindingDecisionsQueryOptions = (findingId: number) =>
  queryOptions({ queryKey: ['findings', 'decisions', findingId], queryFn: () => getFindingDecisions(findingId) });

export function useFindingDecisions(findingId: number) {
  return useQuery(getFindingDecisionsQueryOptions(findingId));
}
