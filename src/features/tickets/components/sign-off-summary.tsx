import { FINDING_KIND_LABELS } from '../../../../shared/schemas/findings';
import type { TicketDetail } from '../../../../shared/schemas/tickets';
import { formatDateTime, formatLength, formatSignedLength, type LengthUnit } from '../../../lib/format';

const kindLabel = (k: string) => FINDING_KIND_LABELS[k as keyof typeof FINDING_KIND_LABELS] ?? k;

/**
 * What a sign-off accepts, in the dialog that asks for it: the repair, where
 * the fault was found against where it was located, and the calibration it
 * filed, so nobody signs for something they have not read.
 */
export function SignOffSummary({ t, unit }: { t: TicketDetail; unit: LengthUnit }) {
  const c = t.closeouts[0];
  return (
    <div className="space-y-1 rounded-md border border-rule p-3 text-sm" data-testid="sign-off-summary">
      <p className="font-semibold">{t.title}</p>
      <p>
        {t.cableRun.name} · {t.site.name}
      </p>
      {c ? (
        <>
          <p data-testid="sign-off-found">
            Found {formatLength(c.foundDistanceM, unit)} from end {c.measuredFrom}
            {c.method === 'marker' && c.markerLabel ? ` (${formatLength(c.offsetM ?? 0, unit)} on the ground past ${c.markerLabel})` : ''}; located{' '}
            {formatLength(c.locatedDistanceM, unit)} (located − found {formatSignedLength(c.errorM, unit)}).
          </p>
          <p data-testid="sign-off-work">
            {kindLabel(c.cause)}: {c.workDone}
          </p>
          <p className="text-ink-soft">
            Recorded by {c.recordedBy.name}, {formatDateTime(c.recordedAt)}.{' '}
            {c.calibrationId ? `Filed field calibration ${c.calibrationId} (implied velocity factor ${c.impliedVf?.toFixed(3) ?? '—'}).` : 'No calibration filed.'}
          </p>
        </>
      ) : (
        <p data-testid="sign-off-found">No close-out is recorded on this ticket.</p>
      )}
    </div>
  );
}
