import { queryOptions, useQuery } from '@tanstack/react-query';
import type { MeasurementView } from '../../../../shared/schemas/measurements';
import { api } from '../../../lib/api-client';

/** Every reading recorded on a finding, corrected and withdrawn ones too, oldest first. */
export const listMeasurements = (findingId: number) =>
  api<MeasurementView[]>('/api/measurements', { query: { findingId, all: 'true' } });

export const listMeasurementsQueryOptions = (findingId: number) =>
  queryOptions({ queryKey: ['measurements', { findingId }], queryFn: () => listMeasurements(findingId) });

export function useMeasurements(findingId: number) {
  return useQuery(listMeasurementsQueryOptions(findingId));
}
