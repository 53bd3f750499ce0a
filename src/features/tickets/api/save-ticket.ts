import { useMutation, useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import type { CloseoutInput, TicketCreateInput, TicketDetail, TicketUpdateInput } from '../../../../shared/schemas/tickets';
import type { TicketStatus } from '../../../../shared/tickets/status';
import { api } from '../../../lib/api-client';
import { repeatKey } from '../../../lib/repeat-key';
import { getTicketQueryOptions } from './get-ticket';

export const createTicket = (input: TicketCreateInput) => api<TicketDetail>('/api/tickets', { method: 'POST', body: input });
export const updateTicket = ({ id, ...patch }: TicketUpdateInput & { id: number }, idempotencyKey?: string) =>
  api<TicketDetail>(`/api/tickets/${id}`, { method: 'PATCH', body: patch, idempotencyKey });
export const moveTicket = ({ id, to, comment }: { id: number; to: TicketStatus; comment?: string }) =>
  api<TicketDetail>(`/api/tickets/${id}/status`, { method: 'POST', body: { to, comment: comment || null } });
export const commentOnTicket = ({ id, comment }: { id: number; comment: string }, idempotencyKey?: string) =>
  api<TicketDetail>(`/api/tickets/${id}/comments`, { method: 'POST', body: { comment }, idempotencyKey });
export const closeOutTicket = ({ id, ...input }: CloseoutInput & { id: number }, idempotencyKey?: string) =>
  api<TicketDetail>(`/api/tickets/${id}/closeout`, { method: 'POST', body: input, idempotencyKey });

/** Every ticket change refreshes the lists, the ticket, the dashboard and the calibration queue it may feed. */
function useTicketMutation<TIn>(fn: (input: TIn) => Promise<TicketDetail>, onTaken?: () => void) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: fn,
    onSuccess: (t) => {
      onTaken?.();
      const key = getTicketQueryOptions(t.id).queryKey;
      qc.setQueryData(key, t);
      // The answer is the ticket as it now stands: every other ticket query is refreshed, this one is not asked for again.
      void qc.invalidateQueries({ queryKey: ['tickets'], predicate: (q) => !(q.queryKey.length === key.length && q.queryKey.every((k, i) => k === key[i])) });
      void qc.invalidateQueries({ queryKey: ['dashboard'] });
      void qc.invalidateQueries({ queryKey: ['calibrations'] });
    },
  });
}

export const useCreateTicket = () => useTicketMutation(createTicket);
/** An edit sent again with the same values (its answer lost) goes under the same key: its comment is recorded and mailed once. */
export function useUpdateTicket() {
  const [key] = useState(() => repeatKey('edit'));
  return useTicketMutation((input: TicketUpdateInput & { id: number }) => updateTicket(input, key.keyFor(input)), key.taken);
}
export const useMoveTicket = () => useTicketMutation(moveTicket);
/** A comment sent again with the same words (its answer lost) goes under the same key: the server records and mails it once. */
export function useCommentOnTicket() {
  const [key] = useState(() => repeatKey('comment'));
  return useTicketMutation((input: { id: number; comment: string }) => commentOnTicket(input, key.keyFor(input)), key.taken);
}
/** A close-out sent again with the same values (its answer lost) goes under the same key: the server records it once. */
export function useCloseOutTicket() {
  const [key] = useState(() => repeatKey('closeout'));
  return useTicketMutation((input: CloseoutInput & { id: number }) => closeOutTicket(input, key.keyFor(input)), key.taken);
}
