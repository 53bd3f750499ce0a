import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { MailJobView } from '../../../../shared/schemas/outbox';
import { api } from '../../../lib/api-client';

export const retryMailJob = (id: number) => api<MailJobView>(`/api/outbox/queue/${id}/retry`, { method: 'POST' });

export function useRetryMailJob() {
  const qc = useQueryClient();
  return useMutation({ mutationFn: retryMailJob, onSuccess: () => qc.invalidateQueries({ queryKey: ['outbox'] }) });
}
