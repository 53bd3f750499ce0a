import { queryOptions, useQuery } from '@tanstack/react-query';
import type { TicketDetail } from '../../../../shared/schemas/tickets';
import { api } from '../../../lib/api-client';

export const getTicket = (id: number) => api<TicketDetail>(`/api/tickets/${id}`);

export const getTicketQueryOptions = (id: number) =>
  queryOptions({
    queryKey: ['tickets', 'one', id],
    queryFn: () => getTicket(id),
    // Keep watching while an e-mail about it is still on its way.
    refetchInterval: (q) => (q.state.data?.mail.some((m) => m.status === 'queued' || m.status === 'sending') ? 4_000 : false),
  });

export function useTicket(id: number) {
  return useQuery(getTicketQueryOptions(id));
}
