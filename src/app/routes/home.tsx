import { Link } from 'react-router-dom';
import { ROLE_LABELS } from '../../../shared/auth/permissions';
import { Card, PageHeader } from '../../components/ui/card';
import { ErrorNotice, Loading } from '../../components/ui/notice';
import { SafetyCaution } from '../../components/ui/safety-caution';
import { useSession } from '../../features/auth/use-session';
import { useDevice, useOnline } from '../../features/offline/device-context';
import { useCalibrations } from '../../features/calibrations/api/list-calibrations';
import { useTickets } from '../../features/tickets/api/list-tickets';
import { useUnticketedFindings } from '../../features/tickets/api/list-unticketed-findings';
import { UnticketedFindings } from '../../features/dashboard/components/unticketed-findings';
import { PriorityBadge, TicketStatusBadge } from '../../features/tickets/components/ticket-badges';
import type { TicketSummary } from '../../../shared/schemas/tickets';
import { formatAge, formatDate } from '../../lib/format';
import { NAV } from '../nav';
import { paths } from '../paths';

function TicketLinks({ items }: { items: Array<Omit<TicketSummary, 'cableRun'>> }) {
  return (
    <ul className="divide-y divide-rule">
      {items.map((t) => (
        <li key={t.id}>
          <Link to={paths.ticket.to(t.id)} className="block min-h-11 py-2 hover:text-copper">
            <span className="font-semibold">{t.title}</span>
            <span className="mt-0.5 flex flex-wrap items-center gap-1 text-xs text-ink-soft">
              <TicketStatusBadge status={t.status} />
              <PriorityBadge priority={t.priority} />
              {t.site.name} · raised {formatAge(t.createdAt)}
              {t.dueDate && ` · due ${formatDate(t.dueDate)}`}
            </span>
          </Link>
        </li>
      ))}
    </ul>
  );
}

function OpenTickets({ mine }: { mine: boolean }) {
  const tickets = useTickets({ status: 'open', assignee: mine ? 'me' : 'any', page: 1 });
  const online = useOnline();
  const { field } = useDevice();
  const title = mine ? 'Your open repairs' : 'Open repairs';
  // Without signal the list cannot come: the person's own repairs kept on the phone stand in, or it is said calmly.
  if (!online && !tickets.data) {
    const saved = mine ? field?.tickets : undefined;
    return (
      <Card title={title}>
        {saved && field ? (
          <>
            <p className="text-sm text-ink-soft" data-testid="repairs-saved">
              No signal: as saved on this phone {formatAge(field.savedAt)}, with where to dig.
            </p>
            {saved.length === 0 ? <p className="mt-2 text-sm text-mist">Nothing was assigned to you then.</p> : <TicketLinks items={saved.slice(0, 5)} />}
          </>
        ) : (
          <p className="text-sm text-ink-soft" data-testid="repairs-offline">
            Not shown without signal: the list comes back with the signal.
          </p>
        )}
      </Card>
    );
  }
  if (tickets.isPending) return <Loading what="Loading repairs" />;
  if (tickets.error) return <ErrorNotice error={tickets.error} onRetry={() => void tickets.refetch()} retrying={tickets.isFetching} />;
  const items = tickets.data.items.slice(0, 5);
  return (
    <Card
      title={title}
      actions={
        <Link to={paths.tickets.to()} className="text-sm font-semibold text-teal underline">
          All tickets ({tickets.data.total})
        </Link>
      }
    >
      {items.length === 0 ? (
        <p className="text-sm text-mist">{mine ? 'Nothing assigned to you right now.' : 'No open repair tickets.'}</p>
      ) : (
        <TicketLinks items={items} />
      )}
    </Card>
  );
}

/** A supervisor's first task: confirmed findings that still need a repair ticket. */
function FindingsWaiting() {
  const { unit } = useSession();
  const f = useUnticketedFindings();
  if (f.isPending) return <Loading what="Loading findings waiting for a ticket" />;
  if (f.error) return <ErrorNotice error={f.error} onRetry={() => void f.refetch()} retrying={f.isFetching} />;
  return <UnticketedFindings items={f.data} unit={unit} canRaise title="Findings waiting for a repair ticket" limit={5} />;
}

function PendingCalibrations() {
  const cals = useCalibrations({ status: 'pending', page: 1 });
  if (cals.isPending) return <Loading what="Loading calibrations" />;
  if (cals.error) return <ErrorNotice error={cals.error} onRetry={() => void cals.refetch()} retrying={cals.isFetching} />;
  return (
    <Card
      title="Calibrations waiting for review"
      actions={
        <Link to={paths.calibrations.to()} className="text-sm font-semibold text-teal underline">
          Review queue ({cals.data.total})
        </Link>
      }
    >
      {cals.data.items.length === 0 ? (
        <p className="text-sm text-mist">The queue is empty.</p>
      ) : (
        <ul className="divide-y divide-rule text-sm">
          {cals.data.items.slice(0, 5).map((c) => (
            <li key={c.id} className="py-2">
              <span className="font-semibold">{c.cableType.name}</span>: VF {c.vf.toFixed(3)} against library {c.libraryVf.toFixed(3)} (
              {(c.deviation * 100).toFixed(1)} %), from {c.submittedBy?.name ?? 'a repair close-out'}, {formatAge(c.createdAt)}
            </li>
          ))}
        </ul>
      )}
    </Card>
  );
}

/** The start page: what this role does first, one tap away. */
export function HomePage() {
  const { user, can } = useSession();
  const items = NAV.filter((i) => i.to !== '/' && (!i.permission || can(i.permission)));
  const fieldWorker = can('traces:upload') && !can('users:manage');
  const online = useOnline();
  return (
    <>
      <PageHeader title={`Hello, ${user.name.split(' ')[0]}`} subtitle={`Signed in as ${ROLE_LABELS[user.role].toLowerCase()}.`} />
      <div className="grid grid-cols-1 gap-4 lg:grid-cols-[minmax(0,2fr)_minmax(0,1fr)]">
        <div className="space-y-4">
          {can('tickets:manage') && online && <FindingsWaiting />}
          {can('traces:upload') && (
            // Without signal the upload cannot reach the server: the big button goes where a trace can be read now.
            <div>
              <Link
                to={online ? paths.upload.to() : paths.deviceAnalyse.to()}
                className="flex min-h-16 items-center justify-center rounded-lg bg-copper px-6 text-lg font-bold text-white shadow hover:bg-copper-dark"
                data-testid="home-upload"
              >
                {online ? 'Upload a trace from site' : 'Analyse a trace on this phone'}
              </Link>
              {!online && (
                <p className="mt-1 text-sm text-ink-soft">No signal: the trace is read on this phone and sent to the server when the signal is back.</p>
              )}
            </div>
          )}
          {can('tickets:work') && !can('tickets:manage') && <OpenTickets mine />}
          {can('tickets:manage') && <OpenTickets mine={false} />}
          {can('calibrations:review') && <PendingCalibrations />}
          <Card title="Everything you can open">
            <ul className="grid gap-2 sm:grid-cols-2">
              {items.map((i) => (
                <li key={i.to}>
                  <Link to={i.to} className="flex min-h-12 items-center rounded-md border border-rule px-4 font-semibold hover:border-copper hover:text-copper">
                    {i.label}
                  </Link>
                </li>
              ))}
            </ul>
          </Card>
        </div>
        {(fieldWorker || can('tickets:work')) && <SafetyCaution compact className="self-start" />}
      </div>
    </>
  );
}
export default HomePage;
