import { Link } from 'react-router-dom';
import type { DuplicateFile, TraceDetail, UploadResult } from '../../../../shared/schemas/traces';
import { Notice } from '../../../components/ui/notice';
import { ApiError } from '../../../lib/api-client';
import { formatDateTime } from '../../../lib/format';

/** Refusals caused by the file itself: sending the same file again would only repeat them. */
const FILE_AT_FAULT = new Set(['trace_unreadable', 'wrong_file_type', 'file_too_large', 'duplicate_upload']);

export function fileAtFault(error: unknown): boolean {
  return error instanceof ApiError && FILE_AT_FAULT.has(error.code);
}

/** Whether two chosen files hold the same bytes (whatever their names or dates). */
export async function sameBytes(a: Blob, b: Blob): Promise<boolean> {
  if (a.size !== b.size) return false;
  const [x, y] = await Promise.all([a.arrayBuffer(), b.arrayBuffer()]).then(([p, q]) => [new Uint8Array(p), new Uint8Array(q)]);
  for (let i = 0; i < x.length; i++) if (x[i] !== y[i]) return false;
  return true;
}

function Duplicates({ list, traceLink }: { list: DuplicateFile[]; traceLink: (id: number) => string }) {
  return (
    <ul className="mt-1 space-y-1" data-testid="duplicate-list">
      {list.map((d) => (
        <li key={`${d.originalName}-${d.traceId}`}>
          <strong className="break-all">{d.originalName}</strong> is already on this run from this end, uploaded {formatDateTime(d.uploadedAt)}:{' '}
          <Link className="font-semibold text-teal underline" to={traceLink(d.traceId)}>
            open trace {d.traceId}
          </Link>
        </li>
      ))}
    </ul>
  );
}

/**
 * What an upload came to: the traces stored, files that were already on the
 * run (same bytes, same end: not stored again), and refusals, saying whether
 * the files were cleared from the form so the same file is not sent twice.
 */
export function UploadOutcome({
  error,
  data,
  describe,
  traceLink,
}: {
  error: unknown;
  data: UploadResult | undefined;
  describe: (error: unknown) => string;
  traceLink: (id: number) => string;
}) {
  if (error) {
    const body = error instanceof ApiError ? error.body : undefined;
    const duplicates = (body?.duplicates as DuplicateFile[] | undefined) ?? [];
    if (error instanceof ApiError && error.code === 'duplicate_upload') {
      return (
        <Notice tone="warn" title={duplicates.length === 1 ? 'Already uploaded: not stored again' : 'All already uploaded: none stored again'}>
          <Duplicates list={duplicates} traceLink={traceLink} />
          <p className="mt-1">The file was cleared from the form. If this is a new measurement, export it again from the instrument.</p>
        </Notice>
      );
    }
    const stored = (body?.traces as TraceDetail[] | undefined) ?? [];
    return (
      <Notice tone="danger" title={stored.length ? 'The file was kept, but it could not be read' : 'Nothing was uploaded'}>
        <p>{describe(error)}</p>
        {stored.map((t) => (
          <p key={t.id} className="mt-1">
            <Link className="font-semibold text-teal underline" to={traceLink(t.id)}>
              See the stored file {t.originalName}
            </Link>{' '}
            (it can be archived from there)
          </p>
        ))}
        <p className="mt-1" data-testid="upload-form-state">
          {fileAtFault(error)
            ? 'The file was cleared from the form, so it is not sent again. Choose another file.'
            : 'Your files are still selected: fix the problem and send again.'}
        </p>
      </Notice>
    );
  }
  if (!data) return null;
  return (
    <>
      {data.traces.length > 0 && (
        <Notice tone={data.traces.every((t) => t.status !== 'failed') ? 'ok' : 'warn'} title="Uploaded">
          <ul>
            {data.traces.map((t) => (
              <li key={t.id}>
                <Link className="font-semibold text-teal underline" to={traceLink(t.id)}>
                  {t.originalName}
                </Link>{' '}
                —{' '}
                {t.status === 'ok'
                  ? `${t.eventCount} event${t.eventCount === 1 ? '' : 's'}`
                  : t.status === 'pending'
                    ? 'large file: analysing in the background (its page shows the result when ready)'
                    : `could not be read: ${t.errorMessage}`}
              </li>
            ))}
          </ul>
        </Notice>
      )}
      {data.duplicates.length > 0 && (
        <Notice tone="warn" title="Not stored again">
          <Duplicates list={data.duplicates} traceLink={traceLink} />
        </Notice>
      )}
    </>
  );
}
