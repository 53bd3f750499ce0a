import { useMutation, useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import type { z } from 'zod';
import type { MeasurementCorrectionSchema, MeasurementInput, MeasurementView } from '../../../../shared/schemas/measurements';
import { api } from '../../../lib/api-client';
import { repeatKey } from '../../../lib/repeat-key';

type History = { measurement: MeasurementView; history: MeasurementView[] };
export type MeasurementCorrectionInput = z.input<typeof MeasurementCorrectionSchema>;

export const recordMeasurement = (input: MeasurementInput, idempotencyKey?: string) =>
  api<MeasurementView>('/api/measurements', { method: 'POST', body: input, idempotencyKey });
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

/** A reading sent again with the same values (its answer lost) goes under the same key: the server stores it once. */
export function useRecordMeasurement() {
  const invalidate = useInvalidateLocation();
  const [key] = useState(() => repeatKey('reading'));
  return useMutation({
    mutationFn: (input: MeasurementInput) => recordMeasurement(input, key.keyFor(input)),
    onSuccess: () => {
      key.taken();
      return invalidate();
    },
  });
}

export function useCorrectMeasurement() {
  const invalidate = useInvalidateLocation();
  return useMutation({ mutationFn: correctMeasurement, onSuccess: invalidate });
}

export function useWithdrawMeasurement() {
  const invalidate = useInvalidateLocation();
  return useMutation({ mutationFn: withdrawMeasurement, onSuccess: invalidate });
}
