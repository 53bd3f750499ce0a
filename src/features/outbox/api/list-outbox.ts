import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { OutboxMessageView } from '../../../../shared/schemas/outbox';
import type { Page } from '../../../../shared/schemas/users';
import { api } from '../../../lib/api-client';

export interface ListOutboxParams {
  to?: string;
  page: number;
  /** Only the mail sent to the signed-in person (a supervisor's view); else every message (administrators). */
  mine?: boolean;
}

export const listOutbox = (p: ListOutboxParams) =>
  api<Page<OutboxMessageView>>(p.mine ? '/api/outbox/mine' : '/api/outbox', { query: { to: p.to, page: p.page } });

export const getOutboxQueryOptions = (p: ListOutboxParams) =>
  queryOptions({ queryKey: ['outbox', 'messages', p], queryFn: () => listOutbox(p), placeholderData: keepPreviousData, refetchInterval: 5_000 });

export function useOutbox(p: ListOutboxParams) {
  return useQuery(getOutboxQueryOptions(p));
}
