import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { CalibrationStatus, CalibrationView } from '../../../../shared/schemas/cables';
import type { Page } from '../../../../shared/schemas/users';
import { api } from '../../../lib/api-client';

export interface ListCalibrationsParams {
  status: CalibrationStatus | 'all';
  page: number;
}

export const listCalibrations = (p: ListCalibrationsParams) => api<Page<CalibrationView>>('/api/calibrations', { query: { status: p.status, page: p.page } });

export const getCalibrationsQueryOptions = (p: ListCalibrationsParams) =>
  queryOptions({ queryKey: ['calibrations', 'list', p], queryFn: () => listCalibrations(p), placeholderData: keepPreviousData });

export function useCalibrations(p: ListCalibrationsParams) {
  return useQuery(getCalibrationsQueryOptions(p));
}
