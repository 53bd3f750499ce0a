import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { CalibrationSource, CalibrationView } from '../../../../shared/schemas/cables';
import { api } from '../../../lib/api-client';

export interface CalibrationInput {
  cableTypeId: number;
  knownLengthM: number;
  roundTripNs: number;
  source: CalibrationSource;
  traceId?: number | null;
  note?: string;
}

export const submitCalibration = (input: CalibrationInput) => api<CalibrationView>('/api/calibrations', { method: 'POST', body: input });

export function useSubmitCalibration() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: submitCalibration,
    onSuccess: (c) => {
      void qc.invalidateQueries({ queryKey: ['calibrations'] });
      void qc.invalidateQueries({ queryKey: ['cables', 'one', c.cableType.id, 'calibrations'] });
    },
  });
}
