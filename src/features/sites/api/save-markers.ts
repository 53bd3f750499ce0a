import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { CableRunView, RouteMarkerInput, RouteMarkerView } from '../../../../shared/schemas/sites';
import { api } from '../../../lib/api-client';

export const saveMarkers = ({ runId, markers, basedOn }: { runId: number; markers: RouteMarkerInput[]; basedOn?: { markers: RouteMarkerView[] } }) =>
  api<CableRunView>(`/api/cable-runs/${runId}/markers`, { method: 'PUT', body: { markers, basedOn } });

export function useSaveMarkers() {
  const qc = useQueryClient();
  return useMutation({ mutationFn: saveMarkers, onSuccess: () => qc.invalidateQueries({ queryKey: ['cable-runs'] }) });
}
