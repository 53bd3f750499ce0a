import type { TicketEventView } from '../../../../shared/schemas/tickets';
import { TICKET_PRIORITY_LABELS, TICKET_STATUS_LABELS, type TicketPriority } from '../../../../shared/tickets/status';
import { formatDate, formatDateTime } from '../../../lib/format';

const KIND_WORDS: Record<TicketEventView['kind'], string> = {
  created: 'raised the ticket',
  assigned: 'assigned the ticket',
  status: 'moved it',
  updated: 'changed details',
  comment: 'commented',
  closeout: 'recorded the close-out',
};

const FIELD_WORDS: Record<string, string> = { title: 'Title', priority: 'Priority', dueDate: 'Due date', notes: 'Notes', assignee: 'Assignee' };

/** A changed value as the rest of the page writes it: a priority by its label, a due date as a date. */
function show(field: string, v: unknown): string {
  if (v === null || v === undefined || v === '') return 'none';
  if (field === 'priority') return TICKET_PRIORITY_LABELS[v as TicketPriority] ?? String(v);
  if (field === 'dueDate') return formatDate(String(v));
  return String(v);
}

/**
 * What the person did, in words. An assignment that also moves the status is
 * followed by that status step, so it names the act rather than the field
 * ("assigned the ticket: Raised → Assigned", not "changed the assignee: Raised →
 * Assigned", which read as if the assignee were a status).
 */
function kindWords(e: TicketEventView): string {
  if (e.kind === 'assigned' && e.changes?.assignee) {
    const [before, after] = e.changes.assignee;
    if (after === null || after === undefined || after === '') return 'took the assignee off the ticket';
    if (before !== null && before !== undefined && before !== '') return 'reassigned the ticket';
  }
  return KIND_WORDS[e.kind];
}

/** Who did what and when, oldest first, each status step as from → to. */
export function TicketTimeline({ events }: { events: TicketEventView[] }) {
  return (
    <ol className="relative space-y-4 border-l-2 border-rule pl-5" data-testid="ticket-timeline">
      {events.map((e) => (
        <li key={e.id} className="relative">
          <span className={`absolute -left-[27px] top-1.5 h-3 w-3 rounded-full border-2 border-card ${e.kind === 'closeout' ? 'bg-ok' : e.kind === 'status' || e.kind === 'assigned' ? 'bg-copper' : 'bg-mist'}`} aria-hidden />
          <p className="text-sm">
            <span className="font-semibold">{e.actor.name}</span> {kindWords(e)}
            {e.fromStatus && e.toStatus && e.fromStatus !== e.toStatus && (
              <>
                : <span className="font-semibold">{TICKET_STATUS_LABELS[e.fromStatus]}</span> → <span className="font-semibold">{TICKET_STATUS_LABELS[e.toStatus]}</span>
              </>
            )}
          </p>
          <p className="text-xs text-mist tabular">{formatDateTime(e.at)}</p>
          {e.changes && e.kind !== 'created' && e.kind !== 'closeout' && (
            <ul className="mt-1 text-xs text-ink-soft">
              {Object.entries(e.changes).map(([field, [before, after]]) => (
                <li key={field}>
                  {FIELD_WORDS[field] ?? field}: {field === 'notes' ? 'updated' : `${show(field, before)} → ${show(field, after)}`}
                </li>
              ))}
            </ul>
          )}
          {e.comment && <p className="mt-1 whitespace-pre-wrap rounded bg-paper px-3 py-2 text-sm">{e.comment}</p>}
        </li>
      ))}
    </ol>
  );
}
