import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { CableTypeView, CalibrationView } from '../../../../shared/schemas/cables';
import { api } from '../../../lib/api-client';

export interface AcceptInput {
  id: number;
  note?: string;
  /** The VF and tolerance to store, as the reviewer confirmed them. */
  vf?: number;
  vfTolerance?: number;
  /** What the form showed: the library VF and tolerance, and how many calibrations were accepted (see the API). */
  basedOn?: { vf: number; vfTolerance: number; acceptedCount: number };
}

export const acceptCalibration = ({ id, ...body }: AcceptInput) =>
  api<{ calibration: CalibrationView; cable: CableTypeView }>(`/api/calibrations/${id}/accept`, { method: 'POST', body });
export const rejectCalibration = ({ id, reason }: { id: number; reason: string }) =>
  api<CalibrationView>(`/api/calibrations/${id}/reject`, { method: 'POST', body: { reason } });

/** A decision changes the queue and, when accepted, the library entry and its history. */
function useReview<TIn, TOut>(fn: (input: TIn) => Promise<TOut>) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: fn,
    // Also when refused: a 409 says someone else decided meanwhile, and the form then shows what is stored now.
    onSettled: () => {
      void qc.invalidateQueries({ queryKey: ['calibrations'] });
      void qc.invalidateQueries({ queryKey: ['cables'] });
    },
  });
}

export const useAcceptCalibration = () => useReview(acceptCalibration);
export const useRejectCalibration = () => useReview(rejectCalibration);
