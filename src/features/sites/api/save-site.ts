import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { SiteInput, SiteSummary, SiteUpdate } from '../../../../shared/schemas/sites';
import { api } from '../../../lib/api-client';

export const saveSite = ({ id, ...input }: (SiteInput | SiteUpdate) & { id?: number }) =>
  id ? api<SiteSummary>(`/api/sites/${id}`, { method: 'PUT', body: input }) : api<SiteSummary>('/api/sites', { method: 'POST', body: input });

export function useSaveSite() {
  const qc = useQueryClient();
  return useMutation({ mutationFn: saveSite, onSuccess: () => qc.invalidateQueries({ queryKey: ['sites'] }) });
}
