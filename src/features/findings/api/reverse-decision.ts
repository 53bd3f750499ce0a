import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { FindingDecisionView, FindingReverseInput } from '../../../../shared/schemas/finding-decisions';
import type { FindingView } from '../../../../shared/schemas/findings';
import { api } from '../../../lib/api-client';

export const reverseDecision = ({ id, ...body }: FindingReverseInput & { id: number }) =>
  api<{ finding: FindingView; history: FindingDecisionView[] }>(`/api/findings/${id}/reverse`, { method: 'POST', body });

export function useReverseDecision() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: reverseDecision,
    onSuccess: () =>
      Promise.all([
        qc.invalidateQueries({ queryKey: ['findings'] }),
        qc.invalidateQueries({ queryKey: ['traces'] }),
        qc.invalidateQueries({ queryKey: ['tickets'] }),
        qc.invalidateQueries({ queryKey: ['dashboard'] }),
      ]),
  });
}
