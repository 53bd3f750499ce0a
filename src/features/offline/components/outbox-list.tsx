import { Link } from 'react-router-dom';
import { Badge } from '../../../components/ui/notice';
import { Button } from '../../../components/ui/button';
import { formatAge, formatDateTime } from '../../../lib/format';
import type { OutboxItem } from '../outbox-machine';
import { canTryAgain, itemTitle, saveFile, stateWords, traceOfDecision, TONE_OF } from '../outbox-words';

export interface OutboxActions {
  retry?: (id: string) => void;
  remove?: (id: string) => void;
  /** Open an item analysed on this phone. */
  openLink?: (item: OutboxItem) => string | null;
  traceLink: (id: number) => string;
  findingLink: (id: number) => string;
  /** Saving the raw file is offered where the file is still on the phone. */
  canSave: boolean;
  /** Who is reading the list. */
  viewerId: number;
}

function ItemRow({ item, all, actions }: { item: OutboxItem; all: OutboxItem[]; actions: OutboxActions }) {
  const open = actions.openLink?.(item);
  const title = itemTitle(item, all);
  const canRetry = actions.retry && canTryAgain(item);
  const decideOn = item.state === 'failed' && !canTryAgain(item) ? traceOfDecision(item, all) : null;
  return (
    <li className="space-y-1 py-3" data-testid="outbox-item" data-state={item.state}>
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <span className="font-semibold">
          {open ? (
            <Link className="text-teal underline" to={open}>
              {title}
            </Link>
          ) : (
            title
          )}
        </span>
        <Badge tone={TONE_OF[item.state]}>{stateWords(item, actions.viewerId)}</Badge>
      </div>
      {item.kind === 'upload' && (
        <p className="text-sm text-ink-soft">
          {item.where.siteName} · {item.where.cableRunName} · end {item.where.end}
        </p>
      )}
      <p className="text-xs text-mist">
        Made {formatDateTime(item.createdAt)} by {item.userName}
        {item.attempts
          ? ` · ${item.attempts} ${item.attempts === 1 ? 'try' : 'tries'}, last ${formatAge(item.lastAttemptAt)}`
          : ''}
        {item.state === 'failed' && item.nextAttemptAt ? ` · next try ${formatAge(item.nextAttemptAt)}` : ''}
      </p>
      {item.problem && item.state !== 'sent' && (
        <p className="text-sm font-semibold text-danger" data-testid="outbox-problem">
          {item.problem.message}
        </p>
      )}
      {decideOn !== null && (
        <p className="text-sm">
          <Link className="font-semibold text-teal underline" to={actions.traceLink(decideOn)}>
            Decide it on trace {decideOn}
          </Link>
        </p>
      )}
      {item.state === 'sent' && item.kind === 'upload' && item.result && (
        <p className="text-sm">
          On the server as{' '}
          <Link className="font-semibold text-teal underline" to={actions.traceLink(item.result.traceId)}>
            trace {item.result.traceId}
          </Link>
          {item.result.alreadyThere ? ' (it had the file already)' : ''}, {formatAge(item.sentAt)}
        </p>
      )}
      {item.state === 'sent' && item.kind === 'decision' && item.result && (
        <p className="text-sm">
          On the server as{' '}
          <Link className="font-semibold text-teal underline" to={actions.findingLink(item.result.findingId)}>
            finding {item.result.findingId}
          </Link>
        </p>
      )}
      {(canRetry ||
        (actions.canSave && item.kind === 'upload' && item.bytes) ||
        (actions.remove && item.state !== 'sending')) && (
        <div className="flex flex-wrap gap-2 pt-1">
          {canRetry && (
            <Button variant="secondary" onClick={() => actions.retry!(item.id)}>
              Try again
            </Button>
          )}
          {actions.canSave && item.kind === 'upload' && item.bytes && (
            <Button variant="secondary" onClick={() => saveFile(item.fileName, item.bytes!)}>
              Save the file
            </Button>
          )}
          {actions.remove && item.state !== 'sending' && (
            <Button
              variant="ghost"
              onClick={() => {
                const unsent = item.state !== 'sent';
                if (!unsent || window.confirm(`Remove “${title}” from this phone? It has not been sent and cannot be got back.`))
                  actions.remove!(item.id);
              }}
            >
              {item.state === 'sent' ? 'Clear' : 'Remove'}
            </Button>
          )}
        </div>
      )}
    </li>
  );
}

export function OutboxList({
  items,
  all,
  actions,
  empty,
}: {
  items: OutboxItem[];
  all: OutboxItem[];
  actions: OutboxActions;
  empty: string;
}) {
  if (!items.length) return <p className="text-sm text-mist">{empty}</p>;
  return (
    <ul className="divide-y divide-rule" aria-label="Items on this phone">
      {items.map((i) => (
        <ItemRow key={i.id} item={i} all={all} actions={actions} />
      ))}
    </ul>
  );
}
