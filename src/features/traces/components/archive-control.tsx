import { useState } from 'react';
import type { Permission } from '../../../../shared/auth/permissions';
import type { TraceDetail } from '../../../../shared/schemas/traces';
import { Button } from '../../../components/ui/button';
import { ConfirmDialog } from '../../../components/ui/confirm-dialog';
import { fieldErrors, TextField } from '../../../components/ui/field';
import { Notice } from '../../../components/ui/notice';
import { formatDateTime } from '../../../lib/format';
import { useArchiveTrace, useRestoreTrace } from '../api/archive-trace';
import { useTraceOutcomes } from '../api/trace-outcomes';

function ReasonDialog({
  open,
  title,
  body,
  confirmLabel,
  pending,
  error,
  onConfirm,
  onCancel,
}: {
  open: boolean;
  title: string;
  body: string;
  confirmLabel: string;
  pending: boolean;
  error: unknown;
  onConfirm: (reason: string) => void;
  onCancel: () => void;
}) {
  const [reason, setReason] = useState('');
  const errors = fieldErrors(error);
  return (
    <ConfirmDialog
      open={open}
      title={title}
      tone="primary"
      confirmLabel={confirmLabel}
      pending={pending}
      confirmDisabled={reason.trim().length < 3}
      error={error && !errors.reason ? (error as Error).message : undefined}
      onConfirm={() => onConfirm(reason.trim())}
      onCancel={() => (setReason(''), onCancel())}
    >
      <p>{body}</p>
      <TextField label="Why" value={reason} onChange={(e) => setReason(e.target.value)} error={errors.reason} hint="Kept in the trace's history (at least 3 characters)" />
    </ConfirmDialog>
  );
}

/**
 * Archiving a junk or unreadable trace, and restoring one. An archived trace
 * is kept (file, analysis, history) but left out of the lists; its uploader
 * or a supervisor archives it, an administrator restores it.
 */
export function ArchiveControl({ trace, userId, can }: { trace: TraceDetail; userId: number; can: (p: Permission) => boolean }) {
  const state = useTraceOutcomes(trace.id);
  const archive = useArchiveTrace();
  const restore = useRestoreTrace();
  const [asking, setAsking] = useState<'archive' | 'restore' | null>(null);
  const a = state.data?.archive;
  if (!a) return null;
  const last = [...a.history].reverse().find((h) => h.action === 'archived');
  const mayArchive = (trace.uploadedBy.id === userId ? can('traces:upload') : can('traces:archive')) && trace.findingCount === 0 && !trace.isReference;

  if (a.archived) {
    return (
      <Notice tone="warn" title="Archived: kept, but left out of the lists" className="mb-4">
        <p data-testid="archived-reason">
          {last ? `${last.by.name} archived it ${formatDateTime(last.createdAt)}: ${last.reason}` : `Archived ${formatDateTime(a.archivedAt)}.`}
        </p>
        {can('traces:restore') ? (
          <>
            <Button variant="secondary" className="mt-2" onClick={() => setAsking('restore')}>
              Restore to the lists…
            </Button>
            <ReasonDialog
              open={asking === 'restore'}
              title={`Restore trace ${trace.id} to the lists?`}
              body="It shows again in the trace lists and on its run, as before it was archived. The history keeps both steps."
              confirmLabel="Restore the trace"
              pending={restore.isPending}
              error={restore.error}
              onConfirm={(reason) => restore.mutate({ id: trace.id, reason }, { onSuccess: () => setAsking(null) })}
              onCancel={() => (setAsking(null), restore.reset())}
            />
          </>
        ) : (
          <p className="mt-1 text-sm">An administrator can restore it.</p>
        )}
      </Notice>
    );
  }
  if (!mayArchive) return null;
  return (
    <div className="mb-4">
      {a.history.length > 0 && last && (
        <p className="mb-2 text-sm text-ink-soft">
          Archived once by {last.by.name} ({last.reason}) and restored since.
        </p>
      )}
      <Button variant="secondary" onClick={() => setAsking('archive')}>
        Archive this trace…
      </Button>
      <ReasonDialog
        open={asking === 'archive'}
        title={`Archive ${trace.originalName}?`}
        body="It leaves the trace lists, but nothing is deleted: the file, its analysis and this page stay, and an administrator can restore it. Use this for a wrong file, a test shot or a file that could not be read."
        confirmLabel="Archive the trace"
        pending={archive.isPending}
        error={archive.error}
        onConfirm={(reason) => archive.mutate({ id: trace.id, reason }, { onSuccess: () => setAsking(null) })}
        onCancel={() => (setAsking(null), archive.reset())}
      />
    </div>
  );
}
