import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { UploadResult } from '../../../../shared/schemas/traces';
import { uploadWithProgress } from '../../../lib/api-client';

export interface UploadInput {
  files: File[];
  fields: Record<string, string | undefined>;
  onProgress: (fraction: number) => void;
}

const fileKeys = new WeakMap<File, string>();
const uploadKeys = new Map<string, string>();

function randomKey() {
  // getRandomValues works on plain HTTP too, unlike randomUUID.
  const bytes = crypto.getRandomValues(new Uint8Array(16));
  return Array.from(bytes, (b) => b.toString(16).padStart(2, '0')).join('');
}

/**
 * The Idempotency-Key of an upload: each chosen file gets a key of its own,
 * and sending the same files with the same form again (a retry after a lost
 * answer) sends the same key, so the server answers with the first result
 * instead of storing the files twice. The same files sent with a changed form
 * (another run or end, another pulse width or VF) are a new upload with a new
 * key: the server refuses a key reused for another run or end, and would
 * otherwise answer with the first settings' result.
 */
export function uploadKey(files: File[], fields: Record<string, string | undefined> = {}): string {
  const perFile = files
    .map((f) => {
      const key = fileKeys.get(f) ?? randomKey();
      fileKeys.set(f, key);
      return key;
    })
    .join('.');
  const form = JSON.stringify(
    Object.entries(fields)
      .filter(([, v]) => v !== undefined && v !== '')
      .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0)),
  );
  const sent = `${perFile}|${form}`;
  const key = uploadKeys.get(sent) ?? randomKey();
  uploadKeys.set(sent, key);
  return key;
}

export function uploadTraces({ files, fields, onProgress }: UploadInput) {
  const form = new FormData();
  for (const [k, v] of Object.entries(fields)) if (v !== undefined && v !== '') form.append(k, v);
  for (const f of files) form.append('file', f, f.name);
  return uploadWithProgress<UploadResult>('/api/traces', form, onProgress, { 'Idempotency-Key': uploadKey(files, fields) });
}

export function useUploadTraces() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: uploadTraces,
    // A failed parse is stored too, so the lists change either way.
    onSettled: () => Promise.all([qc.invalidateQueries({ queryKey: ['traces'] }), qc.invalidateQueries({ queryKey: ['sites'] })]),
  });
}
