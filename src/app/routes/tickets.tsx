import { useState } from 'react';
import { Link, useNavigate, useSearchParams } from 'react-router-dom';
import type { TicketSummary } from '../../../shared/schemas/tickets';
import { TICKET_STATUS_LABELS, TICKET_STATUSES, type TicketStatus } from '../../../shared/tickets/status';
import { Card, PageHeader } from '../../components/ui/card';
import { SelectField } from '../../components/ui/field';
import { ErrorNotice, Loading } from '../../components/ui/notice';
import { StatusBadge } from '../../components/ui/status-badge';
import { Pager } from '../../components/ui/pager';
import { useSession } from '../../features/auth/use-session';
import { useTickets } from '../../features/tickets/api/list-tickets';
import { NewTicketForm } from '../../features/tickets/components/new-ticket-form';
import { PriorityBadge, TicketStatusBadge } from '../../features/tickets/components/ticket-badges';
import { formatAge, formatDate } from '../../lib/format';
import { paths } from '../paths';

function TicketRow({ t }: { t: TicketSummary }) {
  return (
    <li>
      <Link
        to={paths.ticket.to(t.id)}
        className={`block rounded-md border px-4 py-3 hover:border-copper ${t.mine ? 'border-copper/60 bg-copper-light/30' : 'border-rule bg-card'}`}
        data-testid="ticket-row"
      >
        <div className="flex flex-wrap items-center gap-2">
          <span className="text-xs font-semibold text-mist tabular">Ticket {t.id}</span>
          <TicketStatusBadge status={t.status} />
          <PriorityBadge priority={t.priority} />
          {t.mine && <StatusBadge kind="ticketFlag" status="mine" />}
          {t.mailTrouble && <StatusBadge kind="ticketFlag" status="mailTrouble" />}
        </div>
        <p className="mt-1 font-semibold">{t.title}</p>
        <p className="text-sm text-ink-soft">
          {t.site.name} · {t.cableRun.name}
        </p>
        <p className="text-xs text-mist">
          {t.assignee ? `Assigned to ${t.assignee.name}` : 'Nobody assigned'} ·{' '}
          {t.dueDate ? `due ${formatDate(t.dueDate)}` : 'no due date'} · raised {formatAge(t.createdAt)}
        </p>
      </Link>
    </li>
  );
}

/** Repair tickets: a technician's own first; supervisors raise new ones here. */
export function TicketsPage() {
  const { can, unit } = useSession();
  const navigate = useNavigate();
  const [params] = useSearchParams();
  const preselect = Number(params.get('finding')) || undefined;
  // A link may open the list on one status (the dashboard's "waiting for sign-off": ?status=fixed).
  const asked = params.get('status');
  const [status, setStatus] = useState<TicketStatus | 'open' | 'all'>(
    asked && (asked === 'all' || (TICKET_STATUSES as readonly string[]).includes(asked)) ? (asked as TicketStatus | 'all') : 'open',
  );
  const [onlyMine, setOnlyMine] = useState(false);
  const [page, setPage] = useState(1);
  const tickets = useTickets({ status, assignee: onlyMine ? 'me' : 'any', page });
  const manage = can('tickets:manage');

  return (
    <>
      <PageHeader
        title="Tickets"
        subtitle={
          can('tickets:work') && !manage
            ? 'Your repairs come first, then the rest of the crew’s.'
            : 'Repairs raised from confirmed findings, yours first.'
        }
      />
      <div className={`grid gap-4 ${manage ? 'lg:grid-cols-[3fr_2fr]' : ''}`}>
        <Card title="Repairs">
          <div className="mb-3 grid gap-3 sm:grid-cols-2">
            <SelectField label="Show" value={status} onChange={(e) => (setStatus(e.target.value as typeof status), setPage(1))}>
              <option value="open">Open tickets</option>
              <option value="all">All tickets</option>
              {TICKET_STATUSES.map((s) => (
                <option key={s} value={s}>
                  {TICKET_STATUS_LABELS[s]}
                </option>
              ))}
            </SelectField>
            <label className="flex min-h-11 items-center gap-3 self-end text-sm font-semibold text-ink-soft">
              <input
                type="checkbox"
                className="h-5 w-5 accent-copper"
                checked={onlyMine}
                onChange={(e) => (setOnlyMine(e.target.checked), setPage(1))}
              />
              Only tickets assigned to me
            </label>
          </div>
          {tickets.isPending ? (
            <Loading />
          ) : tickets.error ? (
            <ErrorNotice error={tickets.error} onRetry={() => void tickets.refetch()} retrying={tickets.isFetching} />
          ) : tickets.data.items.length === 0 ? (
            <p className="py-6 text-sm text-mist">No tickets to show.</p>
          ) : (
            <>
              <ul className="space-y-2">
                {tickets.data.items.map((t) => (
                  <TicketRow key={t.id} t={t} />
                ))}
              </ul>
              <Pager page={page} pageSize={tickets.data.pageSize} total={tickets.data.total} onPage={setPage} />
            </>
          )}
        </Card>
        {manage && (
          // Opened to raise a ticket for one finding (from the dashboard or a finding): on a phone the form comes first.
          <Card title="Raise a ticket" className={preselect ? 'order-first lg:order-none' : undefined}>
            <NewTicketForm unit={unit} preselect={preselect} onCreated={(t) => navigate(paths.ticket.to(t.id))} />
          </Card>
        )}
      </div>
    </>
  );
}
export default TicketsPage;
