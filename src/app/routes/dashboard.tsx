import { Link } from 'react-router-dom';
import { TICKET_PRIORITIES, TICKET_PRIORITY_LABELS } from '../../../shared/tickets/status';
import { Card, PageHeader } from '../../components/ui/card';
import { ErrorNotice, Loading } from '../../components/ui/notice';
import { StatusBadge } from '../../components/ui/status-badge';
import { openDaysText } from '../../../shared/tickets/age';
import { useSession } from '../../features/auth/use-session';
import { useDashboard } from '../../features/dashboard/api/get-dashboard';
import { AccuracyChart } from '../../features/dashboard/components/accuracy-chart';
import { UnticketedFindings } from '../../features/dashboard/components/unticketed-findings';
import { MethodAccuracyTable } from '../../features/locate/components/method-accuracy';
import { PriorityBadge, TicketStatusBadge } from '../../features/tickets/components/ticket-badges';
import { formatDate, formatDateTime, formatLength } from '../../lib/format';
import { paths } from '../paths';


/** Supervisors and planners: what is open and for how long, what nobody has picked up, and how good the readings were. */
export function DashboardPage() {
  const { unit, can } = useSession();
  const d = useDashboard();
  if (d.isPending) return <Loading what="Loading the dashboard" />;
  if (d.error) return <ErrorNotice error={d.error} onRetry={() => void d.refetch()} retrying={d.isFetching} />;
  const v = d.data;
  return (
    <>
      <PageHeader title="Dashboard" subtitle={`Open repairs, findings waiting for a ticket, and how close readings came to the digs. Updated ${formatDateTime(v.generatedAt)}.`} />
      {/* min-w-0: a wide table scrolls inside its card instead of pushing the card past a phone's edge. */}
      <div className="grid grid-cols-1 gap-4 xl:grid-cols-2 [&>*]:min-w-0">
        <Card title={`Open tickets (${v.openCount})`}>
          {v.awaitingSignOff > 0 && (
            <p className="mb-2 text-sm" data-testid="awaiting-sign-off">
              <Link to={`${paths.tickets.to()}?status=fixed`} className="font-semibold text-teal underline">
                {v.awaitingSignOff} of them {v.awaitingSignOff === 1 ? 'is' : 'are'} fixed and waiting for sign-off
              </Link>{' '}
              — work for a supervisor, not a crew.
            </p>
          )}
          <div className="overflow-x-auto">
            <table className="w-full text-left text-sm tabular" aria-label="Open tickets by age and priority">
              <thead className="text-xs uppercase text-mist">
                <tr>
                  <th className="py-2">Open for</th>
                  {TICKET_PRIORITIES.map((p) => (
                    <th key={p} className="text-right">
                      {TICKET_PRIORITY_LABELS[p]}
                    </th>
                  ))}
                </tr>
              </thead>
              <tbody>
                {v.byAge.map((row) => (
                  <tr key={row.label} className="border-t border-rule">
                    <td className="py-2 font-semibold">{row.label}</td>
                    {TICKET_PRIORITIES.map((p) => (
                      <td key={p} className={`text-right ${row.counts[p] > 0 && (p === 'urgent' || p === 'high') ? 'font-bold text-danger' : ''}`}>
                        {row.counts[p]}
                      </td>
                    ))}
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          <h3 className="mb-2 mt-4 text-sm font-semibold text-ink-soft">Longest open</h3>
          <ul className="space-y-2">
            {v.oldest.slice(0, 6).map((t) => (
              <li key={t.id}>
                <Link to={paths.ticket.to(t.id)} className="block rounded border border-rule px-3 py-2 hover:border-copper">
                  <span className="flex flex-wrap items-center gap-2">
                    <span className="font-semibold">
                      Ticket {t.id}: {t.title}
                    </span>
                    <TicketStatusBadge status={t.status} />
                    <PriorityBadge priority={t.priority} />
                    {t.overdue && <StatusBadge kind="ticketFlag" status="overdue" />}
                  </span>
                  <span className="block text-xs text-mist">
                    {t.site.name} · open {openDaysText(t.ageDays)} · {t.assignee ? t.assignee.name : 'nobody assigned'}
                    {t.dueDate ? ` · due ${formatDate(t.dueDate)}` : ''}
                  </span>
                </Link>
              </li>
            ))}
            {v.oldest.length === 0 && <li className="text-sm text-mist">No open tickets.</li>}
          </ul>
        </Card>
        <UnticketedFindings items={v.unticketed} unit={unit} canRaise={can('tickets:manage')} />
        <Card title="Located against found, per cable type" className="xl:col-span-2">
          {v.accuracy.length === 0 ? (
            <p className="text-sm text-mist">No close-outs yet. Each repair's found position is compared with the reading here.</p>
          ) : (
            <div className="grid grid-cols-1 gap-4 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
              <AccuracyChart rows={v.accuracy} unit={unit} />
              <div className="overflow-x-auto">
                <table className="w-full text-left text-sm tabular">
                  <thead className="text-xs uppercase text-mist">
                    <tr>
                      <th className="py-2">Cable type</th>
                      <th className="text-right">Repairs</th>
                      <th className="text-right">Mean miss</th>
                      <th className="text-right">Implied VF</th>
                      <th className="text-right">Library VF</th>
                    </tr>
                  </thead>
                  <tbody>
                    {v.accuracy.map((a) => (
                      <tr key={a.cableType.id} className="border-t border-rule">
                        <td className="py-2">{a.cableType.name}</td>
                        <td className="text-right">{a.count}</td>
                        <td className="text-right">
                          {formatLength(a.meanAbsErrorM, unit)}
                          {a.meanAbsErrorPercent !== null && <span className="block text-xs text-mist">{a.meanAbsErrorPercent.toFixed(1)} %</span>}
                        </td>
                        <td className="text-right">{a.meanImpliedVf?.toFixed(3) ?? '—'}</td>
                        <td className="text-right">{a.libraryVf?.toFixed(3) ?? '—'}</td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
            </div>
          )}
        </Card>
        <Card title="Located against found, per method" className="xl:col-span-2">
          <MethodAccuracyTable rows={v.methodAccuracy} unit={unit} />
        </Card>
      </div>
    </>
  );
}
export default DashboardPage;
