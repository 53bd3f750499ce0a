import { Link, useParams } from 'react-router-dom';
import { FINDING_KIND_LABELS } from '../../../shared/schemas/findings';
import { Card, PageHeader } from '../../components/ui/card';
import { ErrorNotice, Loading } from '../../components/ui/notice';
import { StatusBadge } from '../../components/ui/status-badge';
import { SafetyCaution } from '../../components/ui/safety-caution';
import { useSession } from '../../features/auth/use-session';
import { useFinding } from '../../features/findings/api/get-finding';
import { useFindingTwoEnded } from '../../features/findings/api/get-two-ended';
import { DecisionHistory } from '../../features/findings/components/decision-history';
import { DistanceBlock, onlyReadingOf, ReadingAlone, RouteSentence } from '../../features/findings/components/where-to-dig';
import { useBestLocation } from '../../features/locate/api/get-best-location';
import { BestLocationHeadline, LocationMethods } from '../../features/locate/components/best-location';
import { MeasurementPanel } from '../../features/locate/components/measurement-panel';
import { TicketLink } from '../../features/tickets/components/ticket-link';
import { useCableRun } from '../../features/sites/api/get-cable-run';
import { formatDateTime, formatLength, formatSignedLength } from '../../lib/format';
import { paths } from '../paths';
import { Term } from '../../components/ui/term';

export function FindingPage() {
  const id = Number(useParams().findingId);
  const { unit, can, user } = useSession();
  const finding = useFinding(id);
  const best = useBestLocation(id).data ?? null;
  const run = useCableRun(finding.data?.cableRunId ?? 0, finding.data !== undefined);
  const twoEnded = useFindingTwoEnded(id);
  if (finding.isPending) return <Loading what="Loading the finding" />;
  if (finding.error || !finding.data) return <ErrorNotice error={finding.error} onRetry={() => void finding.refetch()} retrying={finding.isFetching} />;
  const f = finding.data;
  const te = twoEnded.data?.twoEnded;
  return (
    <>
      <PageHeader
        title={`Finding ${f.id}: ${FINDING_KIND_LABELS[f.kind as keyof typeof FINDING_KIND_LABELS] ?? f.kind}`}
        subtitle={
          <>
            <Link className="text-teal underline" to={paths.site.to(f.siteId)}>
              {f.siteName}
            </Link>{' '}
            · {f.cableRunName} · {f.status === 'confirmed' ? 'confirmed' : 'dismissed'} by {f.confirmedBy.name}, {formatDateTime(f.confirmedAt)}
          </>
        }
        actions={
          <>
            <StatusBadge kind="finding" status={f.status} />
            {/* A finding a ticket already acts on links to it; a second ticket would be refused. */}
            {(f.tickets ?? []).map((t) => (
              <TicketLink key={t.id} ticket={t} look="button" testId="finding-ticket-link" />
            ))}
            {f.status === 'confirmed' && can('tickets:manage') && !f.tickets?.length && (
              <Link
                to={`${paths.tickets.to()}?finding=${f.id}`}
                className="inline-flex min-h-11 items-center rounded-md bg-copper px-4 text-sm font-semibold text-white hover:bg-copper-dark"
              >
                Raise a repair ticket
              </Link>
            )}
          </>
        }
      />
      <div className="grid grid-cols-1 gap-4 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
        <div className="min-w-0 space-y-4">
          {best &&
            (run.data ? (
              <>
                <Card title="Where to dig">
                  <BestLocationHeadline best={best} run={run.data} unit={unit} fileStem={`finding-${f.id}-location`} />
                </Card>
                <Card title="Readings of this fault">
                  <LocationMethods best={best} unit={unit} findingLink={paths.finding.to} />
                </Card>
              </>
            ) : (
              // The headline needs the cable run (its markers place the fault on the route): until it has come, say so, and show no other distance to dig by.
              <Card title="Where to dig">
                {run.error ? (
                  <ErrorNotice error={run.error} onRetry={() => void run.refetch()} retrying={run.isFetching} />
                ) : (
                  <Loading what="Working out the best location to dig" />
                )}
              </Card>
            ))}
          {f.status === 'confirmed' && run.data && (
            <Card title="Bridge, capacitance and resistance readings">
              <MeasurementPanel
                findingId={f.id}
                installedLengthM={run.data.installedLengthM}
                unit={unit}
                userId={user.id}
                mayRecord={can('measurements:record')}
                mayReview={can('findings:review')}
              />
            </Card>
          )}
          <Card title={best ? 'This TDR reading alone' : 'Where to dig'}>
            {best ? (
              // One of the readings behind the best location: smaller and labelled, so the crew digs by the headline.
              <ReadingAlone
                distanceM={f.distanceM}
                uncertaintyM={f.uncertaintyM}
                windowStartM={f.windowStartM}
                windowEndM={f.windowEndM}
                end={f.end}
                endLabel={f.endLabel}
                unit={unit}
                pos={f.routePosition}
                storedText={f.routePositionText}
                fused={best.distanceFromAM !== null}
                bestShown={run.data !== undefined}
                only={onlyReadingOf(best, f.id)}
              />
            ) : (
              <DistanceBlock distanceM={f.distanceM} windowStartM={f.windowStartM} windowEndM={f.windowEndM} end={f.end} endLabel={f.endLabel} unit={unit} pos={f.routePosition} storedText={f.routePositionText} />
            )}
            {f.note && <p className="mt-3 whitespace-pre-wrap">{f.note}</p>}
          </Card>
          {te && (
            <Card title="Measured from both ends">
              <p className="text-sm text-ink-soft">
                From the two round-trip times ({te.traceA.roundTripNs.toFixed(1)} ns from A, {te.traceB.roundTripNs.toFixed(1)} ns from B) and the installed length{' '}
                {formatLength(te.installedLengthM, unit)}, independent of the velocity factor:
              </p>
              <p className="mt-2 text-3xl font-bold tabular" data-testid="two-ended-distance">
                {formatLength(te.distanceFromAM, unit)} along the cable from end A
              </p>
              <p className="text-sm">
                <RouteSentence pos={te.routePosition} storedText={te.routePositionText} unit={unit} testId="two-ended-route" />
              </p>
              <dl className="mt-2 grid grid-cols-2 gap-x-3 text-sm tabular">
                <dt className="text-mist">Single-ended from A</dt>
                <dd>
                  {formatLength(te.traceA.distanceM, unit)} from A ({formatSignedLength(te.disagreementAM, unit)})
                </dd>
                <dt className="text-mist">Single-ended from B</dt>
                <dd>
                  {formatLength(te.installedLengthM - te.traceB.distanceM, unit)} from A ({formatSignedLength(te.disagreementBM, unit)})
                </dd>
                <dt className="text-mist">Velocity factor implied</dt>
                <dd>{te.impliedVf.toFixed(3)} (library {f.vf})</dd>
              </dl>
            </Card>
          )}
          <Card title="Evidence">
            <dl className="grid grid-cols-2 gap-x-3 gap-y-1 text-sm tabular">
              <dt className="text-mist">Trace</dt>
              <dd>
                <Link className="text-teal underline" to={paths.trace.to(f.traceId)}>
                  {f.traceName}
                </Link>{' '}
                (event {f.eventIndex + 1}, {f.eventType})
              </dd>
              <dt className="text-mist">
                <Term k="roundTrip">Round-trip time</Term>
              </dt>
              <dd>{f.roundTripNs.toFixed(1)} ns</dd>
              <dt className="text-mist">
                <Term k="vf">Velocity factor</Term>
              </dt>
              <dd>
                {f.vf} ± {(f.vfTolerance * 100).toFixed(1)} %
              </dd>
              <dt className="text-mist">
                <Term k="window95">Uncertainty (95 %)</Term>
              </dt>
              <dd>± {formatLength(f.uncertaintyM, unit)}</dd>
              <dt className="text-mist">From end A</dt>
              <dd>{formatLength(f.distanceFromAM, unit)} along the cable</dd>
              {f.routePosition && (
                <>
                  <dt className="text-mist">Slack taken off</dt>
                  <dd>{formatLength(f.routePosition.slackDeductedM, unit)}</dd>
                </>
              )}
              <dt className="text-mist">Engine</dt>
              <dd>{f.engineVersion}</dd>
            </dl>
          </Card>
          <DecisionHistory finding={f} mayReverse={can('findings:review')} />
        </div>
        {/* Its own height beside the long column, not stretched to it. */}
        <SafetyCaution className="self-start lg:sticky lg:top-4" />
      </div>
    </>
  );
}
export default FindingPage;
