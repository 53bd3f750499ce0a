import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { OutboxMessageView } from '../../../../shared/schemas/outbox';
import type { Page } from '../../../../shared/schemas/users';
import { api } from '../../../lib/api-client';

export interface ListOutboxParams {
  to?: string;
  page: number;
}

export const listOutbox = (p: ListOutboxParams) => api<Page<OutboxMessageView>>('/api/outbox', { query: { to: p.to, page: p.page } });

export const getOutboxQueryOptions = (p: ListOutboxParams) =>
  queryOptions({ queryKey: ['outbox', 'messages', p], queryFn: () => listOutbox(p), placeholderData: keepPreviousData, refetchInterval: 5_000 });

export function useOutbox(p: ListOutboxParams) {
  return useQuery(getOutboxQueryOptions(p));
}
