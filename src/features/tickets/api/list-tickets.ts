import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { TicketSummary } from '../../../../shared/schemas/tickets';
import type { Page } from '../../../../shared/schemas/users';
import type { TicketStatus } from '../../../../shared/tickets/status';
import { api } from '../../../lib/api-client';

export interface ListTicketsParams {
  status: TicketStatus | 'open' | 'all';
  assignee: 'me' | 'any';
  page: number;
}

export const listTickets = (p: ListTicketsParams) => api<Page<TicketSummary>>('/api/tickets', { query: { status: p.status, assignee: p.assignee, page: p.page } });

export const getTicketsQueryOptions = (p: ListTicketsParams) =>
  queryOptions({ queryKey: ['tickets', 'list', p], queryFn: () => listTickets(p), placeholderData: keepPreviousData });

export function useTickets(p: ListTicketsParams) {
  return useQuery(getTicketsQueryOptions(p));
}
