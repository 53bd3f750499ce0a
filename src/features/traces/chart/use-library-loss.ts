import { useQuery } from '@tanstack/react-query';
import type { CableTypeView } from '../../../../shared/schemas/cables';
import type { CableRunView } from '../../../../shared/schemas/sites';
import type { TraceDetail } from '../../../../shared/schemas/traces';
import { api } from '../../../lib/api-client';
import { attenuationAt, echoFrequencyHz } from './gain';

/**
 * The cable's attenuation from the library at the frequency that carries the
 * trace's echoes, to start the distance gain from (null when the library has
 * none for this cable type).
 */
export function useLibraryLoss(trace: TraceDetail, enabled: boolean): { dbPer100m: number | null; text: string | null } {
  const runId = trace.cableRun.id;
  const run = useQuery({ queryKey: ['cable-runs', 'one', runId], queryFn: () => api<CableRunView>(`/api/cable-runs/${runId}`), enabled });
  const cableId = run.data?.cableTypeId;
  const cable = useQuery({ queryKey: ['cables', 'one', cableId], queryFn: () => api<CableTypeView>(`/api/cables/${cableId}`), enabled: enabled && cableId !== undefined });
  const c = cable.data;
  if (!c) return { dbPer100m: null, text: null };
  const points = c.attenuation?.length
    ? c.attenuation
    : c.attenuationDbPer100m !== null && c.attenuationFreqMhz !== null
      ? [{ frequencyMhz: c.attenuationFreqMhz, dbPer100m: c.attenuationDbPer100m }]
      : [];
  if (!points.length) return { dbPer100m: null, text: null };
  const a = trace.analysis;
  const f = (a && echoFrequencyHz(a.mode, a.pulseWidthNs, a.riseTimeNs)) ?? points[0].frequencyMhz * 1e6;
  const db = attenuationAt(points, f);
  if (db === null) return { dbPer100m: null, text: null };
  const rounded = Math.round(db * 10) / 10;
  const mhz = f / 1e6;
  return { dbPer100m: rounded, text: `${rounded.toFixed(1)} dB/100 m at ${mhz < 10 ? mhz.toFixed(1) : mhz.toFixed(0)} MHz (${c.name})` };
}
