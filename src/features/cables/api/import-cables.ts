import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';

export type ImportAction = 'create' | 'update' | 'unchanged' | 'invalid';

export interface ImportRow {
  line: number;
  name: string;
  action: ImportAction;
  existingId: number | null;
  changes: Array<{ field: string; from: string | number | null; to: string | number | null }>;
  errors: Array<{ field: string; message: string; line?: number }>;
}

export interface ImportPreview {
  rows: ImportRow[];
  counts: Record<ImportAction, number>;
  canCommit: boolean;
}

const form = (file: File, fields: Record<string, string> = {}) => {
  const f = new FormData();
  f.append('file', file);
  for (const [k, v] of Object.entries(fields)) f.append(k, v);
  return f;
};

export const previewCableImport = (file: File) => api<ImportPreview>('/api/cables/import/preview', { method: 'POST', body: form(file) });
export const commitCableImport = ({ file, reason }: { file: File; reason: string }) =>
  api<{ counts: ImportPreview['counts']; rows: ImportRow[] }>('/api/cables/import', { method: 'POST', body: form(file, { reason }) });

export function usePreviewCableImport() {
  return useMutation({ mutationFn: previewCableImport });
}

export function useCommitCableImport() {
  const qc = useQueryClient();
  return useMutation({ mutationFn: commitCableImport, onSuccess: () => qc.invalidateQueries({ queryKey: ['cables'] }) });
}

/** The export is a plain download. */
export const CABLE_EXPORT_URL = '/api/cables/export';
