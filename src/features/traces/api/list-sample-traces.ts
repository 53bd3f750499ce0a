import { queryOptions, useQuery } from '@tanstack/react-query';
import type { SampleTrace } from '../../../../shared/schemas/traces';
import { api } from '../../../lib/api-client';

export const listSampleTraces = () => api<{ items: SampleTrace[] }>('/api/sample-traces');

export const getSampleTracesQueryOptions = () => queryOptions({ queryKey: ['sample-traces'], queryFn: listSampleTraces });

/** The sample files offered to try an upload with (none unless the demo data is on). */
export function useSampleTraces(enabled = true) {
  return useQuery({ ...getSampleTracesQueryOptions(), enabled });
}

/** One sample's bytes as a file to add to the upload form, named as the list names it. */
export async function fetchSampleTrace(s: Pick<SampleTrace, 'file'>): Promise<File> {
  const text = await api<string>(`/api/sample-traces/${encodeURIComponent(s.file)}`);
  return new File([text], s.file, { type: 'text/csv' });
}
