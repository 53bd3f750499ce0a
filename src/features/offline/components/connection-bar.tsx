import { Link } from 'react-router-dom';
import { countOf, formatAge, formatDateTime } from '../../../lib/format';
import { useDevice } from '../device-context';

/**
 * One line at the top of every page: online or offline, how much waits on
 * this phone, when it last sent, and what went wrong if it did — with the
 * one action that helps.
 */
export function ConnectionBar({ devicePath }: { devicePath: string }) {
  const d = useDevice();
  const waiting = d.waiting.length;
  const signIn = d.waiting.filter((i) => i.state === 'sign-in').length;
  const problem = d.last?.problem ?? null;
  const failed = d.waiting.some((i) => i.state === 'failed' || i.state === 'refused');
  const tone = !d.online ? 'bg-warn-light' : problem || failed ? 'bg-danger-light' : 'bg-card';

  return (
    <div
      className={`no-print mb-4 rounded-md border border-rule px-3 py-1.5 text-sm ${tone}`}
      role="status"
      aria-label="Connection and outbox"
      data-testid="connection-bar"
    >
      <div className="flex flex-wrap items-center gap-x-3 gap-y-1">
        <span className="flex items-center gap-1.5 font-semibold" data-testid="connection-state">
          <span aria-hidden className={`inline-block size-2.5 rounded-full ${d.online ? 'bg-ok' : 'border-2 border-warn'}`} />
          {d.online ? 'Online' : 'Offline'}
        </span>
        {d.fieldUser && (
          <>
            <Link
              to={devicePath}
              className="inline-flex min-h-11 items-center font-semibold text-teal underline"
              data-testid="outbox-count"
            >
              {waiting ? `${countOf(waiting, 'item')} waiting to send` : 'Nothing waiting to send'}
            </Link>
            {d.syncing ? (
              <span>Sending…</span>
            ) : (
              d.last && (
                <span className="text-ink-soft" data-testid="last-sync" title={formatDateTime(d.last.at)}>
                  Last sync {formatAge(d.last.at)}
                  {d.last.problem ? ' (failed)' : d.last.sent ? `, ${countOf(d.last.sent, 'item')} sent` : ''}
                </span>
              )
            )}
            {!d.online && d.field && <span className="text-ink-soft">Field data saved {formatAge(d.field.savedAt)}</span>}
            {signIn > 0 && (
              <button
                type="button"
                className="inline-flex min-h-8 items-center font-semibold text-danger underline"
                onClick={d.askSignIn}
              >
                Sign in to send
              </button>
            )}
            {signIn === 0 && problem && d.online && waiting > 0 && (
              <span className="flex flex-wrap items-center gap-2 text-danger">
                <span data-testid="sync-problem">Last send failed: {problem.message}</span>
                {problem.retryable && (
                  <button
                    type="button"
                    className="min-h-8 rounded border border-danger px-2 font-semibold"
                    onClick={() => void d.sync(true)}
                    disabled={d.syncing}
                  >
                    Try again
                  </button>
                )}
              </span>
            )}
          </>
        )}
      </div>
    </div>
  );
}
