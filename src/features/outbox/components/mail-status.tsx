import type { MailJobView } from '../../../../shared/schemas/outbox';
import { Badge } from '../../../components/ui/notice';
import { formatDateTime } from '../../../lib/format';

const LABELS = { queued: 'waiting to send', sent: 'sent', failed: 'not delivered' } as const;

/** One line per e-mail: status, to whom, and what went wrong if it did. */
export function MailStatusLine({ job }: { job: MailJobView }) {
  const tone = job.status === 'sent' ? 'ok' : job.status === 'failed' ? 'danger' : job.lastError ? 'warn' : 'plain';
  return (
    <div className="space-y-0.5 text-sm">
      <div className="flex flex-wrap items-center gap-2">
        <Badge tone={tone}>{job.status === 'queued' && job.lastError ? 'retrying' : LABELS[job.status]}</Badge>
        <span className="font-semibold">{job.subject}</span>
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
