import { useState } from 'react';
import { useNavigate } from 'react-router-dom';
import type { MailJobStatus, OutboxMessageView } from '../../../shared/schemas/outbox';
import { Button } from '../../components/ui/button';
import { Card, PageHeader } from '../../components/ui/card';
import { SelectField, TextField } from '../../components/ui/field';
import { ErrorNotice, Loading, Notice } from '../../components/ui/notice';
import { Pager } from '../../components/ui/pager';
import { useMailQueue } from '../../features/outbox/api/list-mail-queue';
import { useOutbox } from '../../features/outbox/api/list-outbox';
import { useRetryMailJob } from '../../features/outbox/api/retry-mail-job';
import { MailStatusLine } from '../../features/outbox/components/mail-status';
import { formatDateTime } from '../../lib/format';
import { useSession } from '../../features/auth/use-session';

/**
 * The HTML part in a frame as tall as its content. The frame may not run
 * scripts (sandbox without allow-scripts); allow-same-origin only lets this
 * page measure the content's height once it has loaded, and follow a tapped
 * link: one into Rholog opens here, any other in a new tab (the sandboxed frame
 * itself may not load either, and showed a blocked page).
 */
function FormattedMessage({ html }: { html: string }) {
  const [height, setHeight] = useState(384);
  const navigate = useNavigate();
  return (
    <iframe
      title="Formatted message"
      sandbox="allow-same-origin"
      srcDoc={html}
      style={{ height }}
      onLoad={(e) => {
        const doc = e.currentTarget.contentDocument;
        if (!doc) return;
        setHeight(Math.max(120, doc.documentElement.scrollHeight + 16));
        doc.addEventListener('click', (click) => {
          const link = (click.target as Element | null)?.closest?.('a[href]');
          if (!link) return;
          click.preventDefault();
          const url = new URL(link.getAttribute('href')!, window.location.href);
          if (url.origin === window.location.origin) navigate(url.pathname + url.search + url.hash);
          else window.open(url.href, '_blank', 'noopener,noreferrer');
        });
      }}
      className="w-full rounded border border-rule bg-white"
    />
  );
}

function MessageView({ message }: { message: OutboxMessageView }) {
  // On a phone the 76-character plain text is wider than the screen (it wraps there, out of its columns); the formatted part fits, so it comes first there.
  const [formatted, setFormatted] = useState(() => typeof window !== 'undefined' && window.matchMedia('(width < 40rem)').matches);
  return (
    <article aria-label="Message" className="space-y-3">
      <dl className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-1 text-sm">
        <dt className="text-mist">From</dt>
        <dd className="break-all">{message.from}</dd>
        <dt className="text-mist">To</dt>
        <dd className="break-all">{message.to}</dd>
        {message.cc && (
          <>
            <dt className="text-mist">Cc</dt>
            <dd className="break-all">{message.cc}</dd>
          </>
        )}
        <dt className="text-mist">Sent</dt>
        <dd className="tabular">{formatDateTime(message.sentAt)}</dd>
      </dl>
      <h3 className="text-lg font-semibold" data-testid="outbox-subject">
        {message.subject || '(no subject)'}
      </h3>
      {message.html && (
        <div className="flex gap-2">
          <Button variant={formatted ? 'secondary' : 'primary'} onClick={() => setFormatted(false)}>
            Plain text
          </Button>
          <Button variant={formatted ? 'primary' : 'secondary'} onClick={() => setFormatted(true)}>
            Formatted
          </Button>
        </div>
      )}
      {formatted && message.html ? (
        <FormattedMessage html={message.html} />
      ) : (
        // Fixed-width letters, as a mail reader shows plain text, so the label and value columns line up. Long lines
        // wrap inside the box (its own line breaks kept) rather than running off to the side.
        <pre
          className="whitespace-pre-wrap [overflow-wrap:anywhere] rounded border border-rule bg-paper p-3 font-mono text-xs leading-relaxed sm:text-sm"
          data-testid="outbox-body"
        >
          {message.body || '(no plain-text body)'}
        </pre>
      )}
      <details className="text-xs">
        <summary className="cursor-pointer py-2 font-semibold text-ink-soft">All headers ({message.headers.length})</summary>
        <pre className="overflow-x-auto whitespace-pre-wrap break-all rounded bg-paper p-2 font-mono">
          {message.headers.map((h) => h.line).join('\n')}
        </pre>
      </details>
    </article>
  );
}

/**
 * Admins: every e-mail Rholog has sent, as the local capture server received it, and the send queue.
 * Supervisors: the e-mail sent to them (finding and ticket mail about their sites), nothing else.
 */
export function OutboxPage() {
  const { can, user } = useSession();
  const everything = can('outbox:read');
  const [to, setTo] = useState('');
  const [page, setPage] = useState(1);
  const [selectedId, setSelectedId] = useState<number | null>(null);
  const [status, setStatus] = useState<MailJobStatus | ''>('');
  const [queuePage, setQueuePage] = useState(1);
  const messages = useOutbox({ to: everything ? to || undefined : undefined, page, mine: !everything });
  const queue = useMailQueue({ status: status || undefined, page: queuePage }, everything);
  const retry = useRetryMailJob();
  const selected = messages.data?.items.find((m) => m.id === selectedId) ?? messages.data?.items[0];

  return (
    <>
      <PageHeader
        title="Outbox"
        subtitle={
          everything
            ? 'Every e-mail Rholog sent, newest first, and the queue of mail still waiting to go out.'
            : `The e-mail Rholog sent to you (${user.email}), newest first: findings confirmed and tickets at your sites.`
        }
      />
      {everything && queue.data && (
        <Notice tone="info" className="mb-4">
          Mail goes to the {queue.data.relay}.
        </Notice>
      )}
      <div className="grid grid-cols-[minmax(0,1fr)] gap-4 lg:grid-cols-[minmax(0,2fr)_minmax(0,3fr)]">
        <Card title="Messages">
          {everything && (
            <TextField label="Recipient contains" value={to} onChange={(e) => (setTo(e.target.value), setPage(1))} />
          )}
          {messages.isPending ? (
            <Loading />
          ) : messages.error ? (
            <ErrorNotice error={messages.error} onRetry={() => void messages.refetch()} retrying={messages.isFetching} />
          ) : messages.data.items.length === 0 ? (
            <p className="py-6 text-sm text-mist">
              {everything
                ? 'No e-mail yet. Confirming a finding or assigning a ticket sends one.'
                : 'No e-mail to you yet. A finding confirmed at one of your sites, or a ticket there waiting for your sign-off, sends one.'}
            </p>
          ) : (
            <>
              <ul className="mt-3 divide-y divide-rule" data-testid="outbox-list">
                {messages.data.items.map((m) => (
                  <li key={m.id}>
                    <button
                      type="button"
                      onClick={() => {
                        setSelectedId(m.id);
                        // On a phone the message is below the list: bring it into view.
                        if (window.innerWidth < 1024)
                          document.getElementById('outbox-message')?.scrollIntoView({ behavior: 'smooth', block: 'start' });
                      }}
                      aria-current={selected?.id === m.id ? 'true' : undefined}
                      className={`block min-h-11 w-full px-2 py-2 text-left hover:bg-paper ${selected?.id === m.id ? 'border-l-4 border-copper bg-copper-light/40' : 'border-l-4 border-transparent'}`}
                    >
                      <span className="block truncate font-semibold" data-testid="outbox-subject">
                        {m.subject || '(no subject)'}
                      </span>
                      <span className="block truncate text-xs text-mist">
                        {m.to} · <span className="tabular">{formatDateTime(m.sentAt)}</span>
                      </span>
                    </button>
                  </li>
                ))}
              </ul>
              <Pager page={page} pageSize={messages.data.pageSize} total={messages.data.total} onPage={setPage} />
            </>
          )}
        </Card>
        <Card title={<span id="outbox-message">Message</span>}>
          {selected ? <MessageView message={selected} /> : <p className="text-sm text-mist">Choose a message.</p>}
        </Card>
      </div>
      {everything && (
        <Card title="Send queue" className="mt-4">
          <div className="max-w-xs">
            <SelectField
              label="Show"
              value={status}
              onChange={(e) => (setStatus(e.target.value as MailJobStatus | ''), setQueuePage(1))}
            >
              <option value="">All</option>
              <option value="queued">Waiting to send</option>
              <option value="failed">Not delivered</option>
              <option value="sent">Sent</option>
            </SelectField>
          </div>
          {queue.isPending ? (
            <Loading />
          ) : queue.error ? (
            <ErrorNotice error={queue.error} onRetry={() => void queue.refetch()} retrying={queue.isFetching} />
          ) : (
            <>
              <ul className="mt-3 divide-y divide-rule">
                {queue.data.items.map((j) => (
                  <li
                    key={j.id}
                    className="flex min-w-0 flex-wrap items-center justify-between gap-2 py-2 [overflow-wrap:anywhere]"
                  >
                    <MailStatusLine job={j} />
                    {j.status === 'failed' && (
                      <Button variant="secondary" onClick={() => retry.mutate(j.id)} disabled={retry.isPending}>
                        Try again
                      </Button>
                    )}
                  </li>
                ))}
              </ul>
              <Pager page={queuePage} pageSize={queue.data.pageSize} total={queue.data.total} onPage={setQueuePage} />
            </>
          )}
          {retry.error && <ErrorNotice error={retry.error} />}
        </Card>
      )}
    </>
  );
}
export default OutboxPage;
