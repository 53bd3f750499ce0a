import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { TraceDetail } from '../../../../shared/schemas/traces';
import { api } from '../../../lib/api-client';

export const setReference = ({ id, isReference }: { id: number; isReference: boolean }) =>
  api<TraceDetail>(`/api/traces/${id}/reference`, { method: 'PUT', body: { isReference } });

export function useSetReference() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: setReference,
    onSuccess: () => Promise.all([qc.invalidateQueries({ queryKey: ['traces'] }), qc.invalidateQueries({ queryKey: ['cable-runs'] })]),
  });
}
