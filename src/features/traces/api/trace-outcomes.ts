import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { CalibrationView } from '../../../../shared/schemas/cables';
import type { HealthyOutcomeInput, TraceCalibrationInput, TraceOutcomeView, TraceOutcomesView } from '../../../../shared/schemas/trace-outcomes';
import { api } from '../../../lib/api-client';

export const getTraceOutcomes = (id: number) => api<TraceOutcomesView>(`/api/traces/${id}/outcomes`);

export const getTraceOutcomesQueryOptions = (id: number) => queryOptions({ queryKey: ['traces', 'one', id, 'outcomes'], queryFn: () => getTraceOutcomes(id) });

/** What a trace was recorded as besides a fault, and whether it is archived. */
export function useTraceOutcomes(id: number) {
  return useQuery(getTraceOutcomesQueryOptions(id));
}

export const recordHealthy = ({ traceId, ...body }: HealthyOutcomeInput & { traceId: number }) =>
  api<TraceOutcomeView>(`/api/traces/${traceId}/healthy`, { method: 'POST', body });

export function useRecordHealthy() {
  const qc = useQueryClient();
  return useMutation({ mutationFn: recordHealthy, onSuccess: (o) => qc.invalidateQueries({ queryKey: ['traces', 'one', o.traceId, 'outcomes'] }) });
}

export const fileTraceCalibration = ({ traceId, ...body }: TraceCalibrationInput & { traceId: number }) =>
  api<{ calibration: CalibrationView; outcome: TraceOutcomeView }>(`/api/traces/${traceId}/calibration`, { method: 'POST', body });

export function useFileTraceCalibration() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: fileTraceCalibration,
    onSuccess: (r) =>
      Promise.all([qc.invalidateQueries({ queryKey: ['traces', 'one', r.outcome.traceId, 'outcomes'] }), qc.invalidateQueries({ queryKey: ['calibrations'] })]),
  });
}
