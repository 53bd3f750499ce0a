import type { ReactNode } from 'react';
import { Link, useInRouterContext } from 'react-router-dom';
import { ApiError, describeError, type FieldLabels } from '../../lib/api-client';
import { lengthsInText, type LengthUnit } from '../../lib/format';

type Tone = 'info' | 'ok' | 'warn' | 'danger';
const TONES: Record<Tone, string> = {
  info: 'border-teal bg-teal-light text-ink',
  ok: 'border-ok bg-ok-light text-ink',
  warn: 'border-warn bg-warn-light text-ink',
  danger: 'border-danger bg-danger-light text-ink',
};

export function Notice({ tone = 'info', title, children, className = '' }: { tone?: Tone; title?: ReactNode; children?: ReactNode; className?: string }) {
  return (
    <div role={tone === 'danger' ? 'alert' : 'status'} className={`rounded-md border-l-4 px-4 py-3 text-sm ${TONES[tone]} ${className}`}>
      {title && <p className="font-semibold">{title}</p>}
      {children}
    </div>
  );
}

export function Badge({ tone = 'info', children }: { tone?: Tone | 'plain'; children: ReactNode }) {
  const cls =
    tone === 'plain'
      ? 'bg-rule/50 text-ink-soft'
      : { info: 'bg-teal-light text-teal', ok: 'bg-ok-light text-ok', warn: 'bg-warn-light text-warn', danger: 'bg-danger-light text-danger' }[tone];
  return <span className={`inline-flex items-center rounded px-2 py-0.5 text-xs font-semibold ${cls}`}>{children}</span>;
}

export function Loading({ what = 'Loading' }: { what?: string }) {
  return (
    <p className="py-6 text-sm text-mist" role="status">
      {what}…
    </p>
  );
}

/**
 * A failed request in the reader's words: the form's own labels for the
 * fields, and lengths in the reader's unit when the form deals in lengths.
 * A page that could not load its data (`onRetry`) offers to load it again
 * when trying again can help: no signal, or the server's own failure; a
 * refusal (4xx) would only be refused again. A page whose record is not there
 * (404: an old link, a mistyped number) offers the way back to today's work
 * instead of leaving the reader on a page with nothing else on it.
 */
export function ErrorNotice({
  error,
  labels,
  unit = 'm',
  onRetry,
  retrying = false,
}: {
  error: unknown;
  labels?: FieldLabels;
  unit?: LengthUnit;
  onRetry?: () => void;
  retrying?: boolean;
}) {
  const canRetry = onRetry && !(error instanceof ApiError && error.status >= 400 && error.status < 500);
  const inRouter = useInRouterContext();
  const gone = onRetry && inRouter && error instanceof ApiError && error.status === 404;
  return (
    <Notice tone="danger" title="That did not work">
      {lengthsInText(describeError(error, labels), unit)}
      {canRetry && (
        <button
          type="button"
          onClick={onRetry}
          disabled={retrying}
          className="mt-2 flex min-h-11 items-center rounded-md border border-rule bg-card px-4 py-2 text-sm font-semibold text-ink hover:border-ink-soft disabled:text-mist"
        >
          {retrying ? 'Trying again…' : 'Try again'}
        </button>
      )}
      {gone && (
        <Link to="/" className="mt-1 flex min-h-11 items-center font-semibold text-teal underline">
          Back to today's work
        </Link>
      )}
    </Notice>
  );
}
