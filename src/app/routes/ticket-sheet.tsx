import { Link, useParams } from 'react-router-dom';
import { FINDING_KIND_LABELS } from '../../../shared/schemas/findings';
import type { TicketDetail, TicketFindingView } from '../../../shared/schemas/tickets';
import { TICKET_PRIORITY_LABELS, TICKET_STATUS_LABELS } from '../../../shared/tickets/status';
import { Button } from '../../components/ui/button';
import { ErrorNotice, Loading } from '../../components/ui/notice';
import { SafetyCaution } from '../../components/ui/safety-caution';
import { useSession } from '../../features/auth/use-session';
import { TicketLocations } from '../../features/locate/components/ticket-locations';
import { useTicket } from '../../features/tickets/api/get-ticket';
import { RouteSentence } from '../../features/findings/components/where-to-dig';
import { useTrace } from '../../features/traces/api/get-trace';
import { TraceChart } from '../../features/traces/components/trace-chart';
import { formatDate, formatDateTime, formatLength, formatLengthRange, markerKindTitle, type LengthUnit } from '../../lib/format';
import { paths } from '../paths';

const kindLabel = (k: string) => FINDING_KIND_LABELS[k as keyof typeof FINDING_KIND_LABELS] ?? k;

function TraceSnapshot({ f, unit }: { f: TicketFindingView; unit: LengthUnit }) {
  const trace = useTrace(f.traceId);
  if (trace.isPending) return <Loading what="Loading the trace" />;
  if (trace.error) return <p className="text-sm text-mist">The trace snapshot could not be loaded ({trace.error.message}).</p>;
  return (
    // The chart's zoom buttons are for the screen; paper gets the picture only.
    <div className="break-inside-avoid rounded border border-rule p-2 print:[&_button]:hidden" data-testid="sheet-trace">
      <TraceChart
        trace={trace.data}
        unit={unit}
        axis="distance"
        selectedEvent={f.eventIndex}
        cursors={[f.distanceM, f.distanceM]}
        showReference={false}
        showDifference={false}
        showCursors={false}
        onPick={() => undefined}
      />
      <p className="mt-1 text-xs text-mist">
        Trace {f.traceId} ({trace.data.originalName}), from end {f.measuredFrom}, VF {f.vf.toFixed(3)}
      </p>
    </div>
  );
}

function FindingBlock({ f, t, unit }: { f: TicketFindingView; t: TicketDetail; unit: LengthUnit }) {
  const endLabel = f.measuredFrom === 'A' ? t.cableRun.endALabel : t.cableRun.endBLabel;
  // Under a best location, this reading's narrower window is labelled as its own, never as where to dig.
  const alone = f.bestLocation !== null && f.bestLocation !== undefined;
  const fused = alone && f.bestLocation!.distanceFromAM !== null;
  return (
    <section className="break-inside-avoid space-y-2 border-t border-ink pt-3">
      <h2 className="text-lg font-bold">
        {kindLabel(f.kind)} <span className="text-sm font-normal text-mist">(finding {f.id})</span>
      </h2>
      {alone && (
        <p className="text-sm font-semibold" data-testid="sheet-reading-alone">
          {fused ? 'This reading alone: dig by the best location above.' : 'This reading alone: the readings disagree, check them before digging.'}
        </p>
      )}
      <dl className="grid gap-x-6 gap-y-1 text-sm sm:grid-cols-[auto_1fr] print:grid-cols-[auto_1fr]">
        <dt className="font-semibold">{alone ? 'This reading alone' : 'Distance'}</dt>
        <dd className="tabular" data-testid="sheet-distance">
          {formatLength(f.distanceM, unit)} along the cable from end {f.measuredFrom} ({endLabel}), ± {formatLength(f.uncertaintyM, unit)} (95 %)
        </dd>
        <dt className="font-semibold">{alone ? 'Route position, this reading alone' : 'Route position'}</dt>
        <dd className={fused ? 'text-sm' : 'text-base font-bold'}>
          <RouteSentence pos={f.routePosition} storedText={f.routePositionText} unit={unit} testId="sheet-route-position" warn={!fused} />
        </dd>
        <dt className="font-semibold">{alone ? 'Cable-length window, this reading alone' : 'Cable-length window'}</dt>
        <dd className="tabular">
          {formatLengthRange(f.windowStartM, f.windowEndM, unit)} along the cable from end {f.measuredFrom}, slack included
        </dd>
        {f.note && (
          <>
            <dt className="font-semibold">Technician's note</dt>
            <dd>{f.note}</dd>
          </>
        )}
      </dl>
      <TraceSnapshot f={f} unit={unit} />
    </section>
  );
}

/** A page to print and take to the dig: everything the crew needs without a signal. */
export function TicketSheetPage() {
  const id = Number(useParams().ticketId);
  const { unit } = useSession();
  const ticket = useTicket(id);
  if (ticket.isPending) return <Loading what="Loading the crew sheet" />;
  if (ticket.error) return <ErrorNotice error={ticket.error} onRetry={() => void ticket.refetch()} retrying={ticket.isFetching} />;
  const t = ticket.data;
  const run = t.cableRun;

  return (
    <article className="mx-auto max-w-4xl space-y-4 bg-card p-4 text-ink sm:p-6 print:max-w-none print:p-0 print:text-[12px]" aria-label="Crew sheet">
      <div className="no-print flex flex-wrap items-center justify-between gap-2">
        <Link to={paths.ticket.to(t.id)} className="text-sm font-semibold text-teal underline">
          Back to ticket {t.id}
        </Link>
        <Button onClick={() => window.print()}>Print</Button>
      </div>
      <header className="flex flex-wrap items-end justify-between gap-2 border-b-2 border-ink pb-2">
        <div>
          <p className="text-xs font-semibold uppercase tracking-wide text-mist">Rholog crew sheet · ticket {t.id}</p>
          <h1 className="text-2xl font-bold leading-tight">{t.title}</h1>
        </div>
        <p className="text-sm tabular">
          {TICKET_PRIORITY_LABELS[t.priority]} priority · {t.dueDate ? `due ${formatDate(t.dueDate)}` : 'no due date'} · {TICKET_STATUS_LABELS[t.status]}
        </p>
      </header>

      <SafetyCaution />

      <section className="grid gap-4 text-sm sm:grid-cols-2 print:grid-cols-2">
        <div>
          <h2 className="font-bold">Site</h2>
          <p>{t.site.name}</p>
          {t.siteAddress && <p>{t.siteAddress}</p>}
          <p className="mt-1">
            <span className="font-semibold">Access: </span>
            {t.accessNotes ?? 'no access notes recorded'}
          </p>
        </div>
        <div>
          <h2 className="font-bold">Cable run</h2>
          <p>
            {run.name}: end A {run.endALabel} → end B {run.endBLabel}
          </p>
          <p>
            {run.cableType.name}, {formatLength(run.installedLengthM, unit)} installed
          </p>
          <p className="mt-1">
            <span className="font-semibold">Crew: </span>
            {t.assignee?.name ?? 'not assigned yet'}
          </p>
        </div>
      </section>
      {t.notes && (
        <p className="whitespace-pre-wrap text-sm">
          <span className="font-semibold">Notes: </span>
          {t.notes}
        </p>
      )}

      {t.findings.some((f) => f.bestLocation) && (
        <section className="space-y-2 border-t-2 border-ink pt-3" data-testid="sheet-best-location">
          <h2 className="text-lg font-bold">Where to dig</h2>
          <TicketLocations t={t} unit={unit} />
        </section>
      )}

      {t.findings.map((f) => (
        <FindingBlock key={f.id} f={f} t={t} unit={unit} />
      ))}

      {run.markers.length > 0 && (
        <section className="break-inside-avoid">
          <h2 className="mb-1 font-bold">Route markers (from end A)</h2>
          <table className="w-full text-left text-sm tabular">
            <thead>
              <tr className="border-b border-ink">
                <th className="py-1">Marker</th>
                <th>Kind</th>
                <th className="text-right">Along the route</th>
                <th className="text-right">Slack coiled</th>
              </tr>
            </thead>
            <tbody>
              {run.markers.map((m) => (
                <tr key={m.id} className="border-b border-rule">
                  <td className="py-1 font-semibold">{m.label}</td>
                  <td>{markerKindTitle(m.kind)}</td>
                  <td className="text-right">{formatLength(m.chainageM, unit)}</td>
                  <td className="text-right">{formatLength(m.slackM, unit)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </section>
      )}

      <section className="break-inside-avoid space-y-3 border-t border-ink pt-3 text-sm">
        <h2 className="font-bold">For the crew to fill in</h2>
        {['Found at (marker + distance, or cable length from an end)', 'What it was', 'What was done', 'Name and date'].map((label) => (
          <div key={label}>
            <p className="font-semibold">{label}</p>
            <div className="h-8 border-b border-dashed border-ink-soft" />
          </div>
        ))}
      </section>
      <p className="text-xs text-mist">
        Printed from Rholog {formatDateTime(new Date())}. Distances are guidance from the readings, not a permit to dig; follow local codes and your employer's procedures.
      </p>
    </article>
  );
}
export default TicketSheetPage;
