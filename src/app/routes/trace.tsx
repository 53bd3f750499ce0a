import { useMemo, useState } from 'react';
import { Link, useNavigate, useParams } from 'react-router-dom';
import type { ReflectionEvent } from '../../../shared/schemas/trace-analysis';
import { Button } from '../../components/ui/button';
import { Card, PageHeader } from '../../components/ui/card';
import { Badge, ErrorNotice, Loading, Notice } from '../../components/ui/notice';
import { SafetyCaution } from '../../components/ui/safety-caution';
import { useSession } from '../../features/auth/use-session';
import { DecideEvent } from '../../features/findings/components/decide-event';
import { DistanceBlock, placeEvent } from '../../features/findings/components/where-to-dig';
import { DeviceComparisonNotice } from '../../features/offline/components/device-comparison';
import { useBestLocation } from '../../features/locate/api/get-best-location';
import { BestLocationHeadline } from '../../features/locate/components/best-location';
import { useTrace } from '../../features/traces/api/get-trace';
import { useReanalyseTrace } from '../../features/traces/api/reanalyse-trace';
import { useSetReference } from '../../features/traces/api/set-reference';
import { TraceChart, type XAxis } from '../../features/traces/components/trace-chart';
import { ArchiveControl } from '../../features/traces/components/archive-control';
import { AnalysisPending } from '../../features/traces/components/analysis-pending';
import { CursorPanel } from '../../features/traces/components/cursor-panel';
import { EventCard } from '../../features/traces/components/event-card';
import { eventTitle, warningWords } from '../../features/traces/reflection-words';
import { formatDateTime, formatLength, lengthsInText } from '../../lib/format';
import { paths } from '../paths';
import { Term } from '../../components/ui/term';

/** An engine message as a sentence: capital first letter. */
const sentence = (text: string) => (text ? text.charAt(0).toUpperCase() + text.slice(1) : text);

/** Whether an event is the run's far end: its window reaches the installed length. */
function atFarEnd(e: ReflectionEvent, installedLengthM: number) {
  return e.windowEndM >= installedLengthM && e.windowStartM <= installedLengthM;
}

/**
 * The event a technician most likely came for: of the events on the cable
 * that are neither an echo nor the run's far end, the strongest reflection (largest |ρ|) — a
 * splice or the start of a wet section reflects far less than the fault
 * behind it. Failing that, the strongest of any.
 */
function likelyFault(events: ReflectionEvent[], installedLengthM: number): ReflectionEvent | undefined {
  const strongest = (list: ReflectionEvent[]) =>
    list.reduce<ReflectionEvent | undefined>((best, e) => (!best || Math.abs(e.reflectionCoefficient) > Math.abs(best.reflectionCoefficient) ? e : best), undefined);
  const primary = events.filter((e) => e.likelyMultipleOf === null);
  // A reflection whose whole window lies past the run's end is not on this cable: never the likely fault.
  const onCable = primary.filter((e) => e.windowStartM <= installedLengthM);
  return strongest(onCable.filter((e) => !atFarEnd(e, installedLengthM))) ?? strongest(onCable) ?? strongest(primary) ?? strongest(events);
}

export function TracePage() {
  const id = Number(useParams().traceId);
  const { unit, can, user } = useSession();
  const trace = useTrace(id);
  const setRef = useSetReference();
  const reanalyse = useReanalyseTrace();
  const navigate = useNavigate();
  const [picked, setPicked] = useState<number | null>(null);
  const [axis, setAxis] = useState<XAxis>('distance');
  const [cursors, setCursors] = useState<[number, number] | null>(null);
  const [activeCursor, setActiveCursor] = useState<0 | 1>(0);
  const [showReference, setShowReference] = useState(true);
  const [showDifference, setShowDifference] = useState(false);

  const t = trace.data;
  const events = useMemo(() => t?.analysis?.events ?? [], [t]);
  const selected = events.find((e) => e.index === (picked ?? likelyFault(events, t?.cableRun.installedLengthM ?? Infinity)?.index ?? -1));
  const rangeM = t?.analysis?.rangeM ?? 0;
  const cur: [number, number] = cursors ?? [0, selected?.distanceM ?? rangeM / 2];
  // The fault this trace shows (the chosen event's, else the first confirmed): its best location leads the page.
  const confirmed = t?.findings.filter((f) => f.status === 'confirmed') ?? [];
  const faultFinding = confirmed.find((f) => f.eventIndex === selected?.index) ?? confirmed[0] ?? null;
  const best = useBestLocation(faultFinding?.id ?? null).data ?? null;

  if (trace.isPending) return <Loading what="Loading the trace" />;
  if (trace.error || !t) return <ErrorNotice error={trace.error} onRetry={() => void trace.refetch()} retrying={trace.isFetching} />;

  const run = { ...t.cableRun, markers: t.cableRun.markers };
  const moveCursor = (i: 0 | 1, dM: number) => {
    const next: [number, number] = [...cur];
    next[i] = Math.max(0, Math.min(rangeM, dM));
    setCursors(next);
  };
  const decided = new Map(t.findings.map((f) => [f.eventIndex, f]));
  const newSet = new Set(t.comparison?.newEventIndexes ?? []);

  return (
    <>
      <PageHeader
        title={t.originalName}
        subtitle={
          // The site link is a 44 px target on a phone: it gets a row of its own there, so the words after it keep their line height.
          <span className="flex flex-wrap items-center gap-x-1.5" data-testid="trace-subtitle">
            <Link className="text-teal underline" to={paths.site.to(t.siteId)}>
              {t.siteName}
            </Link>
            <span>
              <span aria-hidden="true" className="hidden sm:inline">
                ·{' '}
              </span>
              {t.cableRunName} · from end {t.end} ({t.endLabel}) · {t.uploadedBy.name}, {formatDateTime(t.createdAt)}
            </span>
          </span>
        }
        actions={
          <>
            {t.isReference && <Badge tone="info">Reference for end {t.end}</Badge>}
            {can('traces:reference') && t.status === 'ok' && (
              <Button variant="secondary" disabled={setRef.isPending} onClick={() => setRef.mutate({ id: t.id, isReference: !t.isReference })}>
                {t.isReference ? 'Stop using as reference' : 'Use as reference'}
              </Button>
            )}
            <a className="inline-flex min-h-11 items-center rounded-md border border-rule bg-card px-4 text-sm font-semibold" href={`/api/traces/${t.id}/raw`}>
              Original file
            </a>
          </>
        }
      />
      <ArchiveControl trace={t} userId={user.id} can={can} />
      <AnalysisPending trace={t} />
      {t.status === 'failed' && (
        <Notice tone="danger" title="This file could not be read" className="mb-4">
          <p>{sentence(lengthsInText(t.error?.message ?? '', unit))}</p>
          <p className="mt-1 text-xs">
            The original is kept unchanged (SHA-256 <code className="break-all">{t.sha256}</code>). Export it again from the instrument as CSV, or set the sample
            interval if the file has a single amplitude column, and upload it again.
          </p>
        </Notice>
      )}
      {t.reanalysisOfId !== null && (
        <Notice tone="info" className="mb-4">
          A re-analysis of the same stored file as{' '}
          <Link className="font-semibold underline" to={paths.trace.to(t.reanalysisOfId)}>
            trace {t.reanalysisOfId}
          </Link>
          , with the library values of {formatDateTime(t.createdAt)}.
        </Notice>
      )}
      <DeviceComparisonNotice trace={t} unit={unit} />
      {t.libraryChangedSince && (
        <Notice
          tone="warn"
          title={t.analysedCableType ? "The cable run's cable type has changed since this analysis" : 'The cable library has changed since this analysis'}
          className="mb-4"
        >
          <p>
            This trace was analysed {t.analysedCableType ? `as ${t.analysedCableType.name}, ` : ''}with VF {t.vf} ± {(t.vfTolerance * 100).toFixed(1)} %. Its
            findings keep the values they were made with.
          </p>
          {t.reanalysedAs.length > 0 ? (
            <p className="mt-1">
              Analysed again as{' '}
              {t.reanalysedAs.map((n, i) => (
                <span key={n}>
                  {i > 0 && ', '}
                  <Link className="font-semibold underline" to={paths.trace.to(n)}>
                    trace {n}
                  </Link>
                </span>
              ))}
              .
            </p>
          ) : (
            can('traces:upload') && (
              <Button
                variant="secondary"
                className="mt-2"
                disabled={reanalyse.isPending}
                onClick={() => reanalyse.mutate(t.id, { onSuccess: (next) => navigate(paths.trace.to(next.id)) })}
              >
                {reanalyse.isPending ? 'Analysing…' : 'Analyse again with the current library value'}
              </Button>
            )
          )}
          {reanalyse.error && <p className="mt-1 font-semibold text-danger">{reanalyse.error.message}</p>}
        </Notice>
      )}
      {t.status === 'ok' && t.analysis && (
        <div className="grid grid-cols-1 gap-4 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
          <div className="min-w-0 space-y-4">
            {best && faultFinding && (
              <Card
                title="Where to dig: best location of the fault"
                actions={
                  <Link className="text-sm font-semibold text-teal underline" to={paths.finding.to(faultFinding.id)}>
                    Finding {faultFinding.id} and every reading of it
                  </Link>
                }
              >
                <BestLocationHeadline best={best} run={t.cableRun} unit={unit} fileStem={`finding-${faultFinding.id}-location`} />
              </Card>
            )}
            {selected ? (
              <EventCard
                trace={t}
                event={selected}
                unit={unit}
                isNew={newSet.has(selected.index)}
                canRecord={can('findings:confirm') && (t.uploadedBy.id === user.id || can('findings:review'))}
                canCalibrate={can('calibrations:submit')}
                distanceBlock={
                  <DistanceBlock
                    distanceM={selected.distanceM}
                    windowStartM={selected.windowStartM}
                    windowEndM={selected.windowEndM}
                    end={t.end}
                    endLabel={t.endLabel}
                    unit={unit}
                    pos={placeEvent(run, t.end, selected)}
                  />
                }
                decision={
                  decided.get(selected.index) ? (
                    <p className="rounded-md bg-ok-light px-3 py-2 font-semibold" role="status">
                      {decided.get(selected.index)!.status === 'confirmed' ? 'Confirmed as a fault' : 'Dismissed'}:{' '}
                      <Link className="text-teal underline" to={paths.finding.to(decided.get(selected.index)!.id)}>
                        finding {decided.get(selected.index)!.id}
                      </Link>
                    </p>
                  ) : can('findings:confirm') && (t.uploadedBy.id === user.id || can('findings:review')) ? (
                    <DecideEvent key={selected.index} traceId={t.id} eventIndex={selected.index} type={selected.type} findingLink={paths.finding.to} />
                  ) : (
                    can('findings:confirm') && (
                      <p className="text-sm text-mist">
                        {t.uploadedBy.name} uploaded this trace: deciding its events is theirs or a supervisor&rsquo;s.
                      </p>
                    )
                  )
                }
              />
            ) : (
              <Notice tone="info" title="No reflection above the noise">
                The engine found no event on this trace. A matched cable with no fault looks like this; so does a trace too short to reach the fault.
              </Notice>
            )}
            <Card
              title="Trace"
              actions={
                <div className="flex gap-1" role="group" aria-label="Horizontal axis">
                  {(['distance', 'time'] as const).map((a) => (
                    <Button key={a} variant={axis === a ? 'primary' : 'secondary'} aria-pressed={axis === a} onClick={() => setAxis(a)}>
                      {a === 'distance' ? 'Distance' : 'Time'}
                    </Button>
                  ))}
                </div>
              }
            >
              <TraceChart
                trace={t}
                unit={unit}
                axis={axis}
                selectedEvent={selected?.index ?? null}
                cursors={cur}
                activeCursor={activeCursor}
                showReference={showReference}
                showDifference={showDifference}
                onPick={(d) => moveCursor(activeCursor, d)}
                onCursorMove={(i, d) => (setActiveCursor(i), moveCursor(i, d))}
              />
              <CursorPanel trace={t} unit={unit} axis={axis} cursors={cur} active={activeCursor} onActive={setActiveCursor} onMove={moveCursor} />
              {t.comparison ? (
                <div className="mt-3 flex flex-wrap items-center gap-3 text-sm">
                  <label className="flex min-h-11 items-center gap-2">
                    <input type="checkbox" className="size-5" checked={showReference} onChange={(e) => setShowReference(e.target.checked)} />
                    Reference ({t.comparison.referenceName})
                  </label>
                  <label className="flex min-h-11 items-center gap-2">
                    <input type="checkbox" className="size-5" checked={showDifference} onChange={(e) => setShowDifference(e.target.checked)} />
                    Difference
                  </label>
                  <span className="text-ink-soft">
                    {t.comparison.newEventIndexes.length === 0
                      ? 'No new events since the reference.'
                      : `New since the reference: event ${t.comparison.newEventIndexes.map((i) => i + 1).join(', ')}.`}
                    {t.comparison.missingReferenceEvents.length > 0 &&
                      ` Gone: ${t.comparison.missingReferenceEvents.map((e) => formatLength(e.distanceM, unit)).join(', ')}.`}
                  </span>
                </div>
              ) : (
                <p className="mt-3 text-sm text-mist">
                  {t.isReference
                    ? `This trace is the reference for end ${t.end}: later traces from this end are compared with it.`
                    : 'No reference trace for this run and end yet; a supervisor can mark one.'}
                </p>
              )}
            </Card>
          </div>
          <div className="space-y-4">
            <SafetyCaution compact />
            <Card title={`Events (${events.length})`}>
              <ul className="space-y-3">
                {events.map((e) => {
                  const f = decided.get(e.index);
                  const isSel = e.index === selected?.index;
                  return (
                    <li key={e.index} className={`rounded-md border-2 p-3 ${isSel ? 'border-copper' : 'border-rule'}`}>
                      <button type="button" className="flex min-h-11 w-full items-baseline justify-between gap-2 text-left" onClick={() => setPicked(e.index)} aria-pressed={isSel}>
                        <span className="font-semibold">
                          {e.index + 1}. {eventTitle(e)}
                          {atFarEnd(e, t.cableRun.installedLengthM) ? ' · far end' : ''}
                          {e.likelyMultipleOf !== null ? ' · echo' : ''}
                          {newSet.has(e.index) ? ' · new' : ''}
                        </span>
                        <span className="text-xl font-bold tabular">{formatLength(e.distanceM, unit)}</span>
                      </button>
                      {f ? (
                        <p className="mt-1 text-sm">
                          <Badge tone={f.status === 'confirmed' ? 'danger' : 'plain'}>{f.status === 'confirmed' ? 'Confirmed fault' : 'Dismissed'}</Badge>{' '}
                          <Link className="text-teal underline" to={paths.finding.to(f.id)}>
                            Finding {f.id}
                          </Link>
                        </p>
                      ) : (
                        <p className="mt-1 text-sm text-mist">{isSel ? 'Shown above: confirm or dismiss it there.' : 'Tap to look at this one.'}</p>
                      )}
                    </li>
                  );
                })}
              </ul>
            </Card>
            <Card title="Analysis">
              <dl className="grid grid-cols-2 gap-x-3 gap-y-1 text-sm tabular">
                <dt className="text-mist">
                  <Term k="vf">Velocity factor</Term>
                </dt>
                <dd>
                  {t.vf} ± {(t.vfTolerance * 100).toFixed(1)} %{t.vfOverrideReason ? ` (override: ${t.vfOverrideReason})` : ''}
                </dd>
                <dt className="text-mist">
                  <Term k="z0">Z0</Term>
                </dt>
                <dd>{t.z0Ohm ?? '—'} Ω</dd>
                <dt className="text-mist">
                  <Term k="traceKind">Trace kind</Term>
                </dt>
                <dd>{t.analysis.mode}</dd>
                <dt className="text-mist">
                  <Term k="blindZone">Blind zone</Term>
                </dt>
                <dd>{formatLength(t.analysis.blindZoneM, unit)}</dd>
                <dt className="text-mist">Range</dt>
                <dd>{formatLength(t.analysis.rangeM, unit)}</dd>
                <dt className="text-mist">Samples</dt>
                <dd>{t.sampleCount.toLocaleString()}</dd>
                <dt className="text-mist">Engine</dt>
                <dd>{t.engineVersion}</dd>
              </dl>
              {t.analysis.warnings.length > 0 && (
                <ul className="mt-2 list-disc pl-5 text-sm text-ink-soft">
                  {t.analysis.warnings.map((w) => (
                    <li key={w.code + w.message}>{sentence(warningWords(w, t.analysis!.blindZoneM, unit))}</li>
                  ))}
                </ul>
              )}
            </Card>
          </div>
        </div>
      )}
    </>
  );
}
export default TracePage;
