import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { FindingInput, FindingView } from '../../../../shared/schemas/findings';
import { api } from '../../../lib/api-client';

export const recordFinding = (input: FindingInput) => api<FindingView>('/api/findings', { method: 'POST', body: input });

export function useRecordFinding() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: recordFinding,
    onSuccess: () =>
      Promise.all([
        qc.invalidateQueries({ queryKey: ['findings'] }),
        qc.invalidateQueries({ queryKey: ['traces'] }),
        qc.invalidateQueries({ queryKey: ['sites'] }),
      ]),
  });
}
