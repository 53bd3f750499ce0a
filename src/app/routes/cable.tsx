import { useState, type ReactNode } from 'react';
import { Link, useParams } from 'react-router-dom';
import { roundTripFromDistance } from '../../../shared/cable/propagation';
import { CALIBRATION_SOURCE_LABELS, type CableTypeView } from '../../../shared/schemas/cables';
import { Button } from '../../components/ui/button';
import { Card, PageHeader } from '../../components/ui/card';
import { ErrorNotice, Loading, Notice } from '../../components/ui/notice';
import { StatusBadge } from '../../components/ui/status-badge';
import { useSession } from '../../features/auth/use-session';
import { ApiError } from '../../lib/api-client';
import { useCable } from '../../features/cables/api/get-cable';
import { useCableCalibrations } from '../../features/cables/api/get-cable-calibrations';
import { useCableHistory } from '../../features/cables/api/get-cable-history';
import { useUpdateCable } from '../../features/cables/api/save-cable';
import { constructionLabel, formatDelay, formatPercent, formatTolerance, formatVf, vfSourceLabel } from '../../features/cables/cable-format';
import { CableForm, changedFields } from '../../features/cables/components/cable-form';
import { CableHistory } from '../../features/cables/components/cable-history';
import { CableLossDetails } from '../../features/cables/components/cable-loss-details';
import { ReanalysisPanel } from '../../features/cables/components/reanalysis-panel';
import { CalibrationChart } from '../../features/calibrations/components/calibration-chart';
import { CalibrationOrigin } from '../../features/calibrations/components/calibration-origin';
import { CalibrationForm, type TraceCalibrationSource } from '../../features/calibrations/components/calibration-form';
import { getTrace } from '../../features/traces/api/get-trace';
import { formatDate, formatDateTime, formatLength, lengthsInText, type LengthUnit } from '../../lib/format';
import { NotFoundPage } from './not-found';
import { paths } from '../paths';
import { Term } from '../../components/ui/term';

/** The cable-end reflection of an uploaded trace and its run's recorded length, as a calibration's inputs. */
async function calibrationFromTrace(traceId: number, unit: LengthUnit): Promise<TraceCalibrationSource> {
  const trace = await getTrace(traceId);
  const end = trace.analysis?.events.find((e) => e.isCableEnd);
  if (!trace.analysis || !end) throw new Error(`Trace ${traceId} has no cable-end reflection to calibrate on.`);
  // The engine's round trip includes any test lead; take the lead's share out at the VF the trace used.
  const leadNs = trace.analysis.leadLengthM > 0 ? roundTripFromDistance(trace.analysis.leadLengthM, trace.vf) * 1e9 : 0;
  return {
    traceId,
    roundTripNs: end.roundTripNs - leadNs,
    knownLengthM: trace.cableRun.installedLengthM,
    cableTypeName: trace.cableRun.cableTypeName,
    // In the writer's unit, as they will read it in the form; every reader later sees it in their own (lengthsInText).
    note:
      `End reflection of trace ${traceId} on ${trace.cableRun.name}; recorded run length ${formatLength(trace.cableRun.installedLengthM, unit)}` +
      (leadNs ? `; test lead of ${formatLength(trace.analysis.leadLengthM, unit)} taken out` : '') +
      '.',
  };
}

function Row({ label, children }: { label: ReactNode; children: ReactNode }) {
  return (
    <div className="grid grid-cols-[9rem_1fr] gap-2 border-t border-rule py-2 text-sm first:border-t-0">
      <dt className="text-ink-soft">{label}</dt>
      <dd className="tabular">{children}</dd>
    </div>
  );
}

export function CablePage() {
  const id = Number(useParams().cableId);
  const { can, unit } = useSession();
  const cable = useCable(id);
  const history = useCableHistory(id);
  const calibrations = useCableCalibrations(id);
  const update = useUpdateCable();
  // The entry as it stood when editing began: the change is computed against it and sent with it, so a save
  // made by someone else meanwhile is neither overwritten unseen nor wiped from the open form by a refetch.
  const [editFrom, setEditFrom] = useState<CableTypeView | null>(null);
  const editing = editFrom !== null;
  const setEditing = (on: boolean) => setEditFrom(on && cable.data ? cable.data : null);
  const [nothingChanged, setNothingChanged] = useState(false);

  if (!Number.isInteger(id) || id <= 0) return <NotFoundPage />;
  if (cable.isPending) return <Loading />;
  if (cable.error) return <ErrorNotice error={cable.error} onRetry={() => void cable.refetch()} retrying={cable.isFetching} />;
  const c = cable.data;

  return (
    <>
      <PageHeader
        title={c.name}
        subtitle={`${constructionLabel(c.construction)} · ${c.dielectric}`}
        actions={
          <>
            <Link to={paths.cables.to()} className="inline-flex min-h-11 items-center px-2 text-sm font-semibold text-teal hover:underline">
              All cable types
            </Link>
            {can('cables:write') && !editing && (
              <Button onClick={() => (setEditing(true), update.reset(), setNothingChanged(false))}>Edit</Button>
            )}
          </>
        }
      />
      <div className="grid grid-cols-1 gap-4 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
        <div className="min-w-0 space-y-4">
          <Card title={editing ? 'Edit the entry' : 'Values'}>
            {editing ? (
              <>
                {update.error instanceof ApiError && update.error.code === 'changed_meanwhile' && (
                  <Notice tone="warn" className="mb-3">
                    <span className="block">Your change was not saved: someone else saved this entry after you opened it.</span>
                    <Button
                      className="mt-2"
                      onClick={async () => {
                        const now = await cable.refetch();
                        if (now.data) setEditFrom(now.data);
                        update.reset();
                      }}
                    >
                      Start again from the saved values
                    </Button>
                  </Notice>
                )}
                {nothingChanged && (
                  <Notice tone="warn" className="mb-3">
                    Nothing changed: every value is the one already stored.
                  </Notice>
                )}
                <CableForm
                  key={editFrom.updatedAt}
                  unit={unit}
                  cable={editFrom}
                  pending={update.isPending}
                  error={update.error}
                  submitLabel="Save the change"
                  onCancel={() => setEditing(false)}
                  onSubmit={(values, reason) => {
                    const patch = changedFields(editFrom, values);
                    if (Object.keys(patch).length === 0) return setNothingChanged(true);
                    const basedOn = Object.fromEntries(Object.keys(patch).map((k) => [k, editFrom[k as keyof typeof patch]]));
                    update.mutate({ id: c.id, ...patch, reason, basedOn }, { onSuccess: () => setEditing(false) });
                  }}
                />
              </>
            ) : (
              <dl data-testid="cable-values">
                <Row label={<Term k="vf">Velocity factor</Term>}>
                  <span className="text-lg font-bold" data-testid="cable-vf">
                    {formatVf(c.vf, 4)}
                  </span>{' '}
                  <span className="text-mist">
                    {formatTolerance(c.vfTolerance)} ({formatVf(c.vf * (1 - c.vfTolerance))}–{formatVf(c.vf * (1 + c.vfTolerance))})
                  </span>
                </Row>
                <Row label="Delay">{formatDelay(c.vf, unit)}</Row>
                <Row label={<Term k="z0">Impedance Z0</Term>}>{c.z0Ohm} Ω</Row>
                <CableLossDetails cable={c} unit={unit} />
                <Row label="VF source">
                  <StatusBadge kind="vfSource" status={c.vfSource} label={vfSourceLabel(c.vfSource)} />
                  {/* A calibration's reference is Rholog's own sentence, stored in metres with every digit: shown in the reader's unit and precision. */}
                  <span className="mt-1 block" data-testid="vf-reference">
                    {c.vfSource === 'field-calibrated' ? lengthsInText(c.vfReference, unit) : c.vfReference}
                  </span>
                </Row>
                {c.notes && <Row label="Notes">{c.notes}</Row>}
                <Row label="Revision">
                  {c.revision} · changed {formatDateTime(c.updatedAt)}
                </Row>
              </dl>
            )}
          </Card>
          <Card title="Field calibrations">
            {calibrations.isPending ? (
              <Loading />
            ) : calibrations.error ? (
              <ErrorNotice error={calibrations.error} onRetry={() => void calibrations.refetch()} retrying={calibrations.isFetching} />
            ) : (
              <>
                <dl className="mb-3 grid grid-cols-3 gap-2 text-center text-sm" data-testid="calibration-stats">
                  <div className="rounded-md bg-paper p-2">
                    <dt className="text-xs text-mist">Accepted (n)</dt>
                    <dd className="text-lg font-bold tabular">{calibrations.data.acceptedStats.count}</dd>
                  </div>
                  <div className="rounded-md bg-paper p-2">
                    <dt className="text-xs text-mist">Mean VF</dt>
                    <dd className="text-lg font-bold tabular">{formatVf(calibrations.data.acceptedStats.mean, 4)}</dd>
                  </div>
                  <div className="rounded-md bg-paper p-2">
                    <dt className="text-xs text-mist">Spread (s.d.)</dt>
                    <dd className="text-lg font-bold tabular">{formatVf(calibrations.data.acceptedStats.stdDev, 4)}</dd>
                  </div>
                </dl>
                <p className="mb-2 text-xs text-mist">
                  Over the {calibrations.data.counts.accepted} accepted and {calibrations.data.counts.pending} pending calibrations: n, mean and spread count the accepted ones,
                  which the library value rests on; {calibrations.data.counts.rejected} rejected left out.
                </p>
                {calibrations.data.items.length > 0 ? (
                  <>
                    <CalibrationChart items={calibrations.data.items} stats={calibrations.data.stats} libraryVf={c.vf} unit={unit} animate={!navigator.webdriver} />
                    <div className="mt-3 overflow-x-auto">
                      <table className="w-full min-w-[38rem] text-left text-sm">
                        <thead className="text-xs uppercase text-mist">
                          <tr>
                            <th className="py-2 pr-3">#</th>
                            <th className="pr-3">Known length</th>
                            <th className="pr-3 text-right">Round trip</th>
                            <th className="pr-3 text-right">VF</th>
                            <th className="pr-3">Status</th>
                            <th className="pr-3">From</th>
                            <th>By</th>
                          </tr>
                        </thead>
                        <tbody>
                          {calibrations.data.items.map((k) => (
                            <tr key={k.id} className="border-t border-rule tabular">
                              <td className="py-2 pr-3">{k.id}</td>
                              <td className="pr-3">{formatLength(k.knownLengthM, unit)}</td>
                              <td className="pr-3 text-right">{k.roundTripNs.toFixed(1)} ns</td>
                              <td className="pr-3 text-right whitespace-nowrap">
                                {formatVf(k.vf, 4)} <span className="text-xs text-mist">{formatPercent(k.deviation)}</span>
                              </td>
                              <td className="pr-3">
                                <StatusBadge kind="calibration" status={k.status} />
                              </td>
                              <td className="pr-3 text-xs">
                                {CALIBRATION_SOURCE_LABELS[k.source]}
                                <CalibrationOrigin c={k} />
                              </td>
                              <td>
                                {k.submittedBy?.name ?? '—'} <span className="text-xs text-mist">{formatDate(k.createdAt)}</span>
                              </td>
                            </tr>
                          ))}
                        </tbody>
                      </table>
                    </div>
                  </>
                ) : (
                  <p className="text-sm text-mist">No field calibrations yet.</p>
                )}
              </>
            )}
          </Card>
        </div>
        <div className="min-w-0 space-y-4">
          {can('calibrations:submit') && (
            <Card title="Record a field calibration">
              <p className="mb-3 text-sm text-ink-soft">
                On a cable of known length, the round-trip time of the far-end reflection gives the VF: VF = 2L / (c·t). A planner reviews it before the library changes.
              </p>
              <CalibrationForm
                cableType={{ id: c.id, name: c.name, vf: c.vf }}
                unit={unit}
                loadTrace={can('traces:read') ? (traceId) => calibrationFromTrace(traceId, unit) : undefined}
              />
            </Card>
          )}
          <Card title="Traces of this cable type">
            <ReanalysisPanel cableId={c.id} revision={c.revision} unit={unit} canStart={can('cables:write')} />
          </Card>
          <Card title="History">
            {history.isPending ? <Loading /> : history.error ? <ErrorNotice error={history.error} onRetry={() => void history.refetch()} retrying={history.isFetching} /> : <CableHistory entries={history.data} unit={unit} />}
          </Card>
        </div>
      </div>
    </>
  );
}
export default CablePage;
