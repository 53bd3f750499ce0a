import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { MailJobView } from '../../../../shared/schemas/outbox';
import { api } from '../../../lib/api-client';

export const retryMailJob = (id: number) => api<MailJobView>(`/api/outbox/queue/${id}/retry`, { method: 'POST' });

export function useRetryMailJob() {
  const qc = useQueryClient();
  // Refreshed after a refusal too (409 not_failed): the list then shows where the job really is.
  return useMutation({ mutationFn: retryMailJob, onSettled: () => qc.invalidateQueries({ queryKey: ['outbox'] }) });
}
