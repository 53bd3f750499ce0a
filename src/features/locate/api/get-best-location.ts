import { queryOptions, useQuery } from '@tanstack/react-query';
import type { FindingView } from '../../../../shared/schemas/findings';
import type { BestLocationView } from '../../../../shared/schemas/measurements';
import { api } from '../../../lib/api-client';

/** A finding as GET /api/findings/:id answers it: with the best location of its fault. */
export type FindingWithBestLocation = FindingView & { bestLocation: BestLocationView | null };

export const getFindingWithBestLocation = (id: number) => api<FindingWithBestLocation>(`/api/findings/${id}`);

/** The same query key as the finding itself: one request serves both. */
export const getBestLocationQueryOptions = (findingId: number) =>
  queryOptions({ queryKey: ['findings', 'one', findingId], queryFn: () => getFindingWithBestLocation(findingId) });

export function useBestLocation(findingId: number | null) {
  return useQuery({ ...getBestLocationQueryOptions(findingId ?? 0), enabled: findingId !== null, select: (f) => f.bestLocation });
}
