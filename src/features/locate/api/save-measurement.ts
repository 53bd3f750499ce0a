import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { z } from 'zod';
import type { MeasurementCorrectionSchema, MeasurementInput, MeasurementView } from '../../../../shared/schemas/measurements';
import { api } from '../../../lib/api-client';

type History = { measurement: MeasurementView; history: MeasurementView[] };
export type MeasurementCorrectionInput = z.input<typeof MeasurementCorrectionSchema>;

export const recordMeasurement = (input: MeasurementInput) => api<MeasurementView>('/api/measurements', { method: 'POST', body: input });
export const correctMeasurement = ({ id, ...body }: MeasurementCorrectionInput & { id: number }) =>
  api<History>(`/api/measurements/${id}/corrections`, { method: 'POST', body });
export const withdrawMeasurement = ({ id, reason }: { id: number; reason: string }) =>
  api<History>(`/api/measurements/${id}/withdraw`, { method: 'POST', body: { reason } });

/** A new, corrected or withdrawn reading moves the best location wherever it is shown. */
function useInvalidateLocation() {
  const qc = useQueryClient();
  return () =>
    Promise.all([
      qc.invalidateQueries({ queryKey: ['measurements'] }),
      qc.invalidateQueries({ queryKey: ['findings'] }),
      qc.invalidateQueries({ queryKey: ['tickets'] }),
    ]);
}

export function useRecordMeasurement() {
  const invalidate = useInvalidateLocation();
  return useMutation({ mutationFn: recordMeasurement, onSuccess: invalidate });
}

export function useCorrectMeasurement() {
  const invalidate = useInvalidateLocation();
  return useMutation({ mutationFn: correctMeasurement, onSuccess: invalidate });
}

export function useWithdrawMeasurement() {
  const invalidate = useInvalidateLocation();
  return useMutation({ mutationFn: withdrawMeasurement, onSuccess: invalidate });
}
