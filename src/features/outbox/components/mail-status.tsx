import type { MailJobView } from '../../../../shared/schemas/outbox';
import { StatusBadge } from '../../../components/ui/status-badge';
import { formatDateTime } from '../../../lib/format';

/** One line per e-mail: status, to whom, and what went wrong if it did. */
export function MailStatusLine({ job }: { job: MailJobView }) {
  return (
    <div className="space-y-0.5 text-sm">
      <div className="flex flex-wrap items-center gap-2">
        <StatusBadge kind="mail" status={job.status === 'queued' && job.lastError ? 'retrying' : job.status} />
        <span className="font-semibold" data-testid="outbox-subject">
          {job.subject}
        </span>
      </div>
      <p className="text-xs text-mist">
        to {job.to}
        {job.sentAt ? ` · sent ${formatDateTime(job.sentAt)}` : ''}
        {job.attempts > 1 || job.status !== 'sent' ? ` · ${job.attempts} ${job.attempts === 1 ? 'try' : 'tries'}` : ''}
        {job.status === 'queued' && job.nextAttemptAt && job.attempts > 0 ? ` · next try ${formatDateTime(job.nextAttemptAt)}` : ''}
      </p>
      {job.lastError && job.status !== 'sent' && <p className="text-xs text-danger">Last error: {job.lastError}</p>}
    </div>
  );
}
