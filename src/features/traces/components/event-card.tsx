import type { ReactNode } from 'react';
import type { ReflectionEvent } from '../../../../shared/schemas/trace-analysis';
import type { TraceDetail } from '../../../../shared/schemas/traces';
import { Card } from '../../../components/ui/card';
import type { LengthUnit } from '../../../lib/format';
import { eventMeaning, eventTitle, signedRho } from '../reflection-words';
import { FarEndPanel, isLastReflection, windowHoldsLength } from './far-end-panel';
import { Term } from '../../../components/ui/term';

/**
 * The chosen event: where it is, what its ρ says, and what can be decided
 * about it. The run's far end on a cable whose recorded length it matches
 * reads as the far end, not as a fault or as "beyond the far end", and
 * offers the healthy-cable outcome and a calibration first.
 */
export function EventCard({
  trace,
  event,
  unit,
  distanceBlock,
  decision,
  isNew,
  canRecord,
  canCalibrate,
}: {
  trace: TraceDetail;
  event: ReflectionEvent;
  unit: LengthUnit;
  /** Where the event is on the ground (the route sentence). */
  distanceBlock: ReactNode;
  /** Confirming or dismissing it as a fault. */
  decision: ReactNode;
  isNew: boolean;
  canRecord: boolean;
  canCalibrate: boolean;
}) {
  const events = trace.analysis?.events ?? [];
  const last = isLastReflection(events, event);
  const farEnd = last && windowHoldsLength(event, trace.cableRun.installedLengthM);
  const reading = (
    <>
      <p className="mt-2 text-sm text-ink-soft tabular" data-testid="event-reading">
        <Term k="rho">Reflection coefficient</Term> {signedRho(event.reflectionCoefficient, 3)}
        {event.impedanceOhm !== null && Number.isFinite(event.impedanceOhm) && event.impedanceOhm < 1e5 ? ` · Z ≈ ${event.impedanceOhm.toFixed(0)} Ω` : ''} · <Term k="roundTrip">round-trip</Term>{' '}
        {event.roundTripNs.toFixed(1)} ns
        {event.likelyMultipleOf !== null ? ` · probably an echo of event ${event.likelyMultipleOf + 1}` : ''}
        {isNew ? ' · new since the reference' : ''}
      </p>
      <p className="mt-1 text-sm" data-testid="event-meaning">
        {eventMeaning(event)}
      </p>
    </>
  );
  const far = (compact: boolean) => (
    <FarEndPanel trace={trace} event={event} unit={unit} canRecord={canRecord} canCalibrate={canCalibrate} compact={compact}>
      {compact ? null : reading}
    </FarEndPanel>
  );
  return (
    <Card title={`Event ${event.index + 1}: ${eventTitle(event)}${farEnd ? ' (far end of the run)' : ''}`}>
      {farEnd ? (
        far(false)
      ) : (
        <>
          {distanceBlock}
          {reading}
        </>
      )}
      <div className="mt-3">
        {farEnd ? (
          <details className="rounded-md border border-rule p-3">
            <summary className="min-h-11 cursor-pointer py-2 font-semibold">Not the far end? Confirm or dismiss it as an event</summary>
            {decision}
          </details>
        ) : (
          decision
        )}
      </div>
      {last && !farEnd && (
        <details className="mt-3 rounded-md border border-rule p-3">
          <summary className="min-h-11 cursor-pointer py-2 font-semibold">Is this the far end? Record it or calibrate from it</summary>
          {far(true)}
        </details>
      )}
    </Card>
  );
}
