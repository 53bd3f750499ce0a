import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { MailJobStatus, MailJobView } from '../../../../shared/schemas/outbox';
import type { Page } from '../../../../shared/schemas/users';
import { api } from '../../../lib/api-client';

export interface ListMailQueueParams {
  status?: MailJobStatus;
  page: number;
}

export type MailQueuePage = Page<MailJobView> & { relay: string };

export const listMailQueue = (p: ListMailQueueParams) => api<MailQueuePage>('/api/outbox/queue', { query: { status: p.status, page: p.page } });

export const getMailQueueQueryOptions = (p: ListMailQueueParams) =>
  queryOptions({ queryKey: ['outbox', 'queue', p], queryFn: () => listMailQueue(p), placeholderData: keepPreviousData, refetchInterval: 5_000 });

export function useMailQueue(p: ListMailQueueParams, enabled = true) {
  return useQuery({ ...getMailQueueQueryOptions(p), enabled });
}
