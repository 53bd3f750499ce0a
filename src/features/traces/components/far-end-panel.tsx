import { useState, type FormEvent, type ReactNode } from 'react';
import { vfFromKnownLengthNs } from '../../../../shared/cable/calibration';
import { roundTripFromDistance } from '../../../../shared/cable/propagation';
import type { ReflectionEvent } from '../../../../shared/schemas/trace-analysis';
import type { TraceDetail } from '../../../../shared/schemas/traces';
import { Button } from '../../../components/ui/button';
import { fieldErrors, TextField } from '../../../components/ui/field';
import { ErrorNotice, Notice } from '../../../components/ui/notice';
import { formatDateTime, formatLength, formatLengthRange, fromUnit, lengthNumber, type LengthUnit } from '../../../lib/format';
import { useFileTraceCalibration, useRecordHealthy, useTraceOutcomes } from '../api/trace-outcomes';
import { Term } from '../../../components/ui/term';

/** Whether the run's recorded length lies inside the event's cable-length window. */
export function windowHoldsLength(e: Pick<ReflectionEvent, 'windowStartM' | 'windowEndM'>, lengthM: number) {
  return e.windowStartM <= lengthM && lengthM <= e.windowEndM;
}

/** The last reflection that is not an echo (or the one the engine took for the cable's end). */
export function isLastReflection(events: ReflectionEvent[], e: ReflectionEvent) {
  return e.likelyMultipleOf === null && (e.isCableEnd || !events.some((o) => o.likelyMultipleOf === null && o.distanceM > e.distanceM));
}

/** How the reading compares with the run's recorded length, in words. */
export function farEndCheck(e: ReflectionEvent, installedM: number, unit: LengthUnit): { tone: 'ok' | 'warn'; text: string } {
  const diff = e.distanceM - installedM;
  const pct = `${Math.abs((diff / installedM) * 100).toFixed(1)} %`;
  if (windowHoldsLength(e, installedM)) {
    const how = Math.abs(diff) < 0.005 ? 'exactly' : `${formatLength(Math.abs(diff), unit)} ${diff > 0 ? 'longer' : 'shorter'}, ${pct}, within the velocity factor’s tolerance`;
    return {
      tone: 'ok',
      text: `The run is recorded as ${formatLength(installedM, unit)}, inside this window: the reading agrees with it (${how}). This is the far end.`,
    };
  }
  if (diff > 0) {
    return {
      tone: 'warn',
      text: `This reads ${formatLength(diff, unit)} (${pct}) beyond the recorded ${formatLength(installedM, unit)}, more than the window allows: check the recorded length and the velocity factor before relying on either.`,
    };
  }
  return {
    tone: 'warn',
    text: `This reads ${formatLength(-diff, unit)} (${pct}) short of the recorded ${formatLength(installedM, unit)}, more than the window allows: it may be a fault rather than the far end, or the recorded length is wrong.`,
  };
}

function Healthy({ trace, event }: { trace: TraceDetail; event: ReflectionEvent }) {
  const record = useRecordHealthy();
  const [note, setNote] = useState('');
  const submit = (e: FormEvent) => {
    e.preventDefault();
    record.mutate({ traceId: trace.id, eventIndex: event.index, ...(note.trim() ? { note: note.trim() } : {}) });
  };
  return (
    <form className="space-y-2" onSubmit={submit} aria-label="Record the far end of a healthy cable">
      <TextField label="Note (optional)" value={note} onChange={(e) => setNote(e.target.value)} hint="How you know it is healthy: insulation test, service restored…" />
      {record.error && <ErrorNotice error={record.error} />}
      <Button type="submit" className="min-h-14 w-full text-base" disabled={record.isPending}>
        Far end, cable healthy
      </Button>
    </form>
  );
}

function Calibrate({ trace, event, unit }: { trace: TraceDetail; event: ReflectionEvent; unit: LengthUnit }) {
  const file = useFileTraceCalibration();
  const [length, setLength] = useState(lengthNumber(trace.cableRun.installedLengthM, unit));
  const errors = fieldErrors(file.error, unit);
  const value = Number(length.trim().replace(',', '.'));
  const knownM = length.trim() && Number.isFinite(value) && value > 0 ? fromUnit(value, unit) : null;
  const leadM = trace.analysis?.leadLengthM ?? 0;
  const roundTripNs = event.roundTripNs - (leadM > 0 ? roundTripFromDistance(leadM, trace.vf) * 1e9 : 0);
  const vf = knownM ? vfFromKnownLengthNs(knownM, roundTripNs) : null;
  const submit = (e: FormEvent) => {
    e.preventDefault();
    if (knownM) file.mutate({ traceId: trace.id, eventIndex: event.index, knownLengthM: knownM });
  };
  if (file.data) {
    return (
      <Notice tone="ok" title="Sent for review">
        Calibration #{file.data.calibration.id} (VF {file.data.calibration.vf.toFixed(4)}) is in the planners’ queue; another planner accepts it into the library.
      </Notice>
    );
  }
  return (
    <form className="space-y-2" onSubmit={submit} aria-label="Calibrate the velocity factor from this known length">
      <TextField label={`Known length of the run (${unit})`} inputMode="decimal" value={length} onChange={(e) => setLength(e.target.value)} error={errors.knownLengthM} hint="From as-built records or a measured drum" />
      <p className="text-sm tabular" data-testid="trace-calibration-vf">
        {vf === null ? (
          'Give the known length to see the VF it gives.'
        ) : (
          <>
            VF = 2L / (c·t) = <strong>{vf.toFixed(4)}</strong> <span className="text-ink-soft">against {trace.vf} used for this trace ({(((vf - trace.vf) / trace.vf) * 100).toFixed(1)} %)</span>
          </>
        )}
      </p>
      {file.error && !errors.knownLengthM && <ErrorNotice error={file.error} />}
      <Button type="submit" variant="secondary" disabled={!knownM || file.isPending}>
        Send this calibration for review
      </Button>
    </form>
  );
}

/**
 * The run's far end, read: how it compares with the recorded length, and
 * what a technician can record from it besides a fault.
 */
export function FarEndPanel({
  trace,
  event,
  unit,
  canRecord,
  canCalibrate,
  compact = false,
  children,
}: {
  trace: TraceDetail;
  event: ReflectionEvent;
  unit: LengthUnit;
  /** Leave out the distance (shown above it already). */
  compact?: boolean;
  /** What the reflection reads (ρ, round trip), shown under the distance. */
  children?: ReactNode;
  /** May record the outcome (their trace, or a supervisor). */
  canRecord: boolean;
  canCalibrate: boolean;
}) {
  const outcomes = useTraceOutcomes(trace.id);
  const check = farEndCheck(event, trace.cableRun.installedLengthM, unit);
  const healthy = outcomes.data?.outcomes.find((o) => o.kind === 'far-end-healthy');
  const calibrations = outcomes.data?.outcomes.filter((o) => o.kind === 'calibration-filed') ?? [];
  const confirmed = trace.findings.find((f) => f.status === 'confirmed');
  return (
    <div className="space-y-3" data-testid="far-end-panel">
      <div className={compact ? 'hidden' : 'space-y-1'}>
        <p className="text-sm text-ink-soft">
          Along the cable from end {trace.end} ({trace.endLabel})
        </p>
        <p className="text-4xl font-bold tabular sm:text-5xl" data-testid="far-end-distance">
          {formatLength(event.distanceM, unit)}
        </p>
        <p className="text-base tabular">
          <span className="font-semibold">
            <Term k="cableWindow">Cable-length window</Term>:
          </span> {formatLengthRange(event.windowStartM, event.windowEndM, unit)} along the cable from end {trace.end}
        </p>
        {children}
      </div>
      <Notice tone={check.tone}>
        <p data-testid="far-end-check">{check.text}</p>
      </Notice>
      {healthy ? (
        <p className="rounded-md bg-ok-light px-3 py-2 font-semibold" role="status" data-testid="healthy-recorded">
          Recorded as the far end of a healthy cable: {formatLength(healthy.measuredLengthM, unit)} measured, by {healthy.recordedBy.name}, {formatDateTime(healthy.createdAt)}.
          {healthy.note ? ` ${healthy.note}` : ''}
        </p>
      ) : confirmed ? (
        <p className="text-sm text-ink-soft">Event {confirmed.eventIndex + 1} of this trace is confirmed as a fault, so it is not recorded as a healthy cable.</p>
      ) : (
        canRecord && outcomes.isSuccess && <Healthy trace={trace} event={event} />
      )}
      {calibrations.map((c) => (
        <p key={c.id} className="text-sm text-ink-soft">
          Calibration #{c.calibrationId} filed from this far end by {c.recordedBy.name}, {formatDateTime(c.createdAt)}.
        </p>
      ))}
      {canCalibrate && (
        <details className="rounded-md border border-rule p-3">
          <summary className="min-h-11 cursor-pointer py-2 font-semibold">Calibrate the VF from this known length</summary>
          <Calibrate trace={trace} event={event} unit={unit} />
        </details>
      )}
    </div>
  );
}
