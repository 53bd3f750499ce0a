import { queryOptions, useQuery } from '@tanstack/react-query';
import type { CalibrationStats } from '../../../../shared/cable/calibration';
import type { CalibrationStatus, CalibrationView } from '../../../../shared/schemas/cables';
import { api } from '../../../lib/api-client';

export interface CableCalibrations {
  libraryVf: number;
  libraryVfTolerance: number;
  /** Over the calibrations not rejected. */
  stats: CalibrationStats;
  acceptedStats: CalibrationStats;
  counts: Record<CalibrationStatus, number>;
  items: CalibrationView[];
}

export const getCableCalibrations = (id: number) => api<CableCalibrations>(`/api/cables/${id}/calibrations`);

export const getCableCalibrationsQueryOptions = (id: number) =>
  queryOptions({ queryKey: ['cables', 'one', id, 'calibrations'], queryFn: () => getCableCalibrations(id) });

export function useCableCalibrations(id: number) {
  return useQuery(getCableCalibrationsQueryOptions(id));
}
