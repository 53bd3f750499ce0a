import { useMutation, useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import type { FindingInput, FindingView } from '../../../../shared/schemas/findings';
import { api } from '../../../lib/api-client';
import { repeatKey } from '../../../lib/repeat-key';

export const recordFinding = (input: FindingInput, idempotencyKey?: string) =>
  api<FindingView>('/api/findings', { method: 'POST', body: input, idempotencyKey });

/** A decision sent again with the same values (its answer lost) goes under the same key: the server answers with the first finding. */
export function useRecordFinding() {
  const qc = useQueryClient();
  const [key] = useState(() => repeatKey('decision'));
  return useMutation({
    mutationFn: (input: FindingInput) => recordFinding(input, key.keyFor(input)),
    onSuccess: () => {
      key.taken();
      return Promise.all([
        qc.invalidateQueries({ queryKey: ['findings'] }),
        qc.invalidateQueries({ queryKey: ['traces'] }),
        qc.invalidateQueries({ queryKey: ['sites'] }),
      ]);
    },
  });
}
