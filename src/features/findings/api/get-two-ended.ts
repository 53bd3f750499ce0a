import { queryOptions, useQuery } from '@tanstack/react-query';
import type { TwoEndedView } from '../../../../shared/schemas/findings';
import { api } from '../../../lib/api-client';

export const getFindingTwoEnded = (findingId: number) => api<{ twoEnded: TwoEndedView | null }>(`/api/findings/${findingId}/two-ended`);

export const getFindingTwoEndedQueryOptions = (findingId: number) =>
  queryOptions({ queryKey: ['findings', 'two-ended', findingId], queryFn: () => getFindingTwoEnded(findingId) });

export function useFindingTwoEnded(findingId: number) {
  return useQuery(getFindingTwoEndedQueryOptions(findingId));
}
