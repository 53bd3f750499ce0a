import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { UploadResult } from '../../../../shared/schemas/traces';
import { uploadWithProgress } from '../../../lib/api-client';

export interface UploadInput {
  files: File[];
  fields: Record<string, string | undefined>;
  onProgress: (fraction: number) => void;
}

export function uploadTraces({ files, fields, onProgress }: UploadInput) {
  const form = new FormData();
  for (const [k, v] of Object.entries(fields)) if (v !== undefined && v !== '') form.append(k, v);
  for (const f of files) form.append('file', f, f.name);
  return uploadWithProgress<UploadResult>('/api/traces', form, onProgress);
}

export function useUploadTraces() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: uploadTraces,
    // A failed parse is stored too, so the lists change either way.
    onSettled: () => Promise.all([qc.invalidateQueries({ queryKey: ['traces'] }), qc.invalidateQueries({ queryKey: ['sites'] })]),
  });
}
