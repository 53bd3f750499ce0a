import type { TraceDetail } from '../../../../shared/schemas/traces';
import { Notice } from '../../../components/ui/notice';
import { formatDateTime } from '../../../lib/format';
import { formatFileSize } from './file-size';

/**
 * A large upload waiting for its background analysis. The page asks for the
 * trace again every few seconds (useTrace polls while it is pending) and
 * shows the result, or the reason it could not be read, as soon as it is in.
 */
export function AnalysisPending({ trace }: { trace: Pick<TraceDetail, 'status' | 'sizeBytes' | 'createdAt'> }) {
  if (trace.status !== 'pending') return null;
  const size = formatFileSize(trace.sizeBytes);
  return (
    <Notice tone="info" title="Analysing…" className="mb-4">
      <p>
        This file ({size}, uploaded {formatDateTime(trace.createdAt)}) is large, so the server analyses it in the background. This
        page shows the result as soon as it is ready; you can leave it and come back.
      </p>
      <p className="mt-1 text-xs">Events can be decided once the analysis has finished.</p>
    </Notice>
  );
}
