import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { CableRunView, RouteMarkerInput } from '../../../../shared/schemas/sites';
import { api } from '../../../lib/api-client';

export const saveMarkers = ({ runId, markers }: { runId: number; markers: RouteMarkerInput[] }) =>
  api<CableRunView>(`/api/cable-runs/${runId}/markers`, { method: 'PUT', body: { markers } });

export function useSaveMarkers() {
  const qc = useQueryClient();
  return useMutation({ mutationFn: saveMarkers, onSuccess: () => qc.invalidateQueries({ queryKey: ['cable-runs'] }) });
}
