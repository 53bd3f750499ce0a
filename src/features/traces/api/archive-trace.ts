import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { ArchivedTraceView, TraceArchiveView } from '../../../../shared/schemas/trace-outcomes';
import type { Page } from '../../../../shared/schemas/users';
import { api } from '../../../lib/api-client';

export const archiveTrace = ({ id, reason }: { id: number; reason: string }) => api<TraceArchiveView>(`/api/traces/${id}/archive`, { method: 'POST', body: { reason } });
export const restoreTrace = ({ id, reason }: { id: number; reason: string }) => api<TraceArchiveView>(`/api/traces/${id}/restore`, { method: 'POST', body: { reason } });

/** Archiving or restoring changes the lists, the trace's own page and the archived list. */
function useArchiveStep(fn: (input: { id: number; reason: string }) => Promise<TraceArchiveView>) {
  const qc = useQueryClient();
  return useMutation({ mutationFn: fn, onSuccess: () => qc.invalidateQueries({ queryKey: ['traces'] }) });
}

export const useArchiveTrace = () => useArchiveStep(archiveTrace);
export const useRestoreTrace = () => useArchiveStep(restoreTrace);

export const listArchivedTraces = (page: number) => api<Page<ArchivedTraceView>>('/api/traces/archived', { query: { page } });

export const getArchivedTracesQueryOptions = (page: number) =>
  queryOptions({ queryKey: ['traces', 'archived', page], queryFn: () => listArchivedTraces(page), placeholderData: keepPreviousData });

export function useArchivedTraces(page: number, enabled = true) {
  return useQuery({ ...getArchivedTracesQueryOptions(page), enabled });
}
