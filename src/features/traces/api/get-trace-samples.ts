import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { SampleWindowView } from '../../../../shared/schemas/trace-outcomes';
import { api } from '../../../lib/api-client';

export interface SampleWindow {
  fromNs: number;
  toNs: number;
  points: number;
}

export const getTraceSamples = (id: number, w: SampleWindow) =>
  api<SampleWindowView>(`/api/traces/${id}/samples`, { query: { fromNs: w.fromNs, toNs: w.toNs, points: w.points } });

export const getTraceSamplesQueryOptions = (id: number, w: SampleWindow) =>
  queryOptions({ queryKey: ['traces', 'one', id, 'samples', w], queryFn: () => getTraceSamples(id, w), staleTime: Infinity, placeholderData: keepPreviousData });

/** A zoomed window of a trace's samples at the file's own detail; nothing is fetched while `w` is null. */
export function useTraceSamples(id: number, w: SampleWindow | null) {
  return useQuery({ ...getTraceSamplesQueryOptions(id, w ?? { fromNs: 0, toNs: 1, points: 100 }), enabled: w !== null });
}
