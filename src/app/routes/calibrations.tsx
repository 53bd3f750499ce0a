import { useState } from 'react';
import { Link } from 'react-router-dom';
import { CALIBRATION_SOURCE_LABELS, type CalibrationStatus, type CalibrationView } from '../../../shared/schemas/cables';
import { Button } from '../../components/ui/button';
import { Card, PageHeader } from '../../components/ui/card';
import { fieldErrors, TextField } from '../../components/ui/field';
import { Badge, ErrorNotice, Loading, Notice } from '../../components/ui/notice';
import { StatusBadge } from '../../components/ui/status-badge';
import { Pager } from '../../components/ui/pager';
import { useSession } from '../../features/auth/use-session';
import { useCableCalibrations } from '../../features/cables/api/get-cable-calibrations';
import { formatPercent, formatVf } from '../../features/cables/cable-format';
import { CalibrationOrigin } from '../../features/calibrations/components/calibration-origin';
import { CalibrationProposal, proposalDefaults, proposalInput, type ProposalValues } from '../../features/calibrations/components/calibration-proposal';
import { useCalibrations } from '../../features/calibrations/api/list-calibrations';
import { useAcceptCalibration, useRejectCalibration } from '../../features/calibrations/api/review-calibration';
import { formatDateTime, formatLength, lengthsInText, type LengthUnit } from '../../lib/format';
import { paths } from '../paths';

const TABS: Array<{ status: CalibrationStatus | 'all'; label: string }> = [
  { status: 'pending', label: 'Waiting' },
  { status: 'accepted', label: 'Accepted' },
  { status: 'rejected', label: 'Rejected' },
  { status: 'all', label: 'All' },
];

function Decide({ c, onDone }: { c: CalibrationView; onDone: (said: string) => void }) {
  const { user, can, unit } = useSession();
  const accept = useAcceptCalibration();
  const reject = useRejectCalibration();
  const [note, setNote] = useState('');
  const [rejecting, setRejecting] = useState(false);
  const errors = { ...fieldErrors(accept.error), ...fieldErrors(reject.error) };
  // The library values proposed from this cable type's accepted calibrations, until the reviewer changes them.
  const cable = useCableCalibrations(c.cableType.id);
  const acceptedVfs = cable.data?.items.filter((k) => k.status === 'accepted' && k.id !== c.id).map((k) => k.vf) ?? [];
  const [edited, setEdited] = useState<ProposalValues | null>(null);
  const values = edited ?? (cable.data ? proposalDefaults(c, acceptedVfs, cable.data.libraryVfTolerance) : null);
  const chosen = values ? proposalInput(values) : null;
  // Four eyes: whoever filed a calibration does not accept it, except an administrator who gives the reason.
  const own = c.submittedBy?.id === user.id;
  const override = own && can('calibrations:override');
  // Said under the accept button while it cannot be pressed, so nobody is left guessing why it is grey.
  const missing = [
    override && note.trim().length < 10 && 'a reason of at least 10 characters for accepting your own calibration',
    values !== null && proposalInput({ ...values, tolerancePct: '1' }) === null && 'a VF to store above 0 and at most 1',
    values !== null && proposalInput({ ...values, vf: '0.5' }) === null && 'a tolerance of 0 to 50 %',
  ].filter((m): m is string => !!m);
  // Held until the repair it came from is signed off: the reason comes first and the accept form waits,
  // so nobody fills in a value for a button that cannot be pressed.
  const held = c.acceptHeld !== null;
  return (
    <div className="space-y-2">
      {held && (
        <div data-testid={`accept-held-${c.id}`}>
          <Notice tone="info" title="Waiting for the repair's sign-off">
            It cannot be accepted yet: {c.acceptHeld}. You may reject it now.
          </Notice>
        </div>
      )}
      {own && (
        <p className="text-sm text-ink-soft">
          You filed this calibration, so another planner accepts it.
          {override ? ' As an administrator you may accept it yourself: say why in the note (kept in the library history).' : ''}
        </p>
      )}
      {!rejecting && !held && (!own || override) && cable.data && values && (
        <CalibrationProposal
          calibration={c}
          accepted={cable.data.acceptedStats}
          acceptedVfs={acceptedVfs}
          libraryVf={cable.data.libraryVf}
          libraryVfTolerance={cable.data.libraryVfTolerance}
          values={values}
          onValues={setEdited}
          errors={errors}
          unit={unit}
        />
      )}
      <TextField
        label={rejecting ? 'Why reject it' : override ? 'Why you accept your own calibration' : 'Note (optional)'}
        value={note}
        onChange={(e) => setNote(e.target.value)}
        error={rejecting ? errors.reason : errors.note}
      />
      <div className="flex flex-wrap gap-2">
        {!rejecting ? (
          <>
            {!held && (!own || override) && (
              <Button
                onClick={() =>
                  accept.mutate(
                    {
                      id: c.id,
                      note: note.trim() || undefined,
                      ...(chosen ?? {}),
                      ...(cable.data ? { basedOn: { vf: cable.data.libraryVf, vfTolerance: cable.data.libraryVfTolerance, acceptedCount: cable.data.acceptedStats.count } } : {}),
                    },
                    { onSuccess: (r) => onDone(`Calibration #${c.id} accepted: ${r.cable.name} is now VF ${formatVf(r.cable.vf, 4)} ± ${(r.cable.vfTolerance * 100).toFixed(1)} % in the library. It is listed under Accepted.`) },
                  )
                }
                disabled={accept.isPending || missing.length > 0}
                aria-describedby={missing.length > 0 ? `accept-missing-${c.id}` : undefined}
              >
                {override ? 'Accept my own, with this reason' : chosen ? `Accept into the library: VF ${chosen.vf.toFixed(4)} ± ${(chosen.vfTolerance * 100).toFixed(1)} %` : 'Accept into the library'}
              </Button>
            )}
            <Button variant="secondary" onClick={() => setRejecting(true)}>
              Reject…
            </Button>
            {!held && (!own || override) && missing.length > 0 && (
              <p id={`accept-missing-${c.id}`} className="basis-full text-sm text-ink-soft" data-testid={`accept-missing-${c.id}`}>
                Still needed: {missing.join(', ').replace(/, ([^,]*)$/, ' and $1')}.
              </p>
            )}
          </>
        ) : (
          <>
            <Button variant="danger" onClick={() => reject.mutate({ id: c.id, reason: note }, { onSuccess: () => onDone(`Calibration #${c.id} rejected: the library is unchanged. It is listed under Rejected.`) })} disabled={reject.isPending}>
              Reject with this reason
            </Button>
            <Button variant="secondary" onClick={() => (setRejecting(false), reject.reset())}>
              Cancel
            </Button>
          </>
        )}
      </div>
      {accept.error && !errors.note && <ErrorNotice error={accept.error} />}
      {reject.error && !errors.reason && <ErrorNotice error={reject.error} />}
    </div>
  );
}

function CalibrationItem({ c, unit, onDone }: { c: CalibrationView; unit: LengthUnit; onDone: (said: string) => void }) {
  const large = Math.abs(c.deviation) > 0.05;
  return (
    <li className="grid gap-3 border-t border-rule py-4 first:border-t-0 md:grid-cols-[3fr_2fr]" data-testid={`calibration-${c.id}`}>
      <div className="text-sm">
        <p className="flex flex-wrap items-center gap-2">
          <span className="font-semibold">#{c.id}</span>
          <Link to={paths.cable.to(c.cableType.id)} className="font-semibold text-teal hover:underline">
            {c.cableType.name}
          </Link>
          {c.status === 'pending' && c.acceptHeld !== null ? <Badge tone="plain">Waiting for the repair's sign-off</Badge> : <StatusBadge kind="calibration" status={c.status} />}
          <Badge tone="plain">{CALIBRATION_SOURCE_LABELS[c.source]}</Badge>
        </p>
        <p className="mt-1 tabular">
          {formatLength(c.knownLengthM, unit)} known length, {c.roundTripNs.toFixed(1)} ns round trip → VF <strong>{formatVf(c.vf, 4)}</strong>{' '}
          <span className={large ? 'font-semibold text-warn' : 'text-mist'}>
            ({formatPercent(c.deviation)} against {formatVf(c.libraryVf)} in the library then)
          </span>
        </p>
        <p className="text-mist">
          {c.submittedBy?.name ?? 'Unknown'} · {formatDateTime(c.createdAt)}
          <CalibrationOrigin c={c} />
        </p>
        {c.status === 'pending' && c.cableType.currentVf !== null && c.cableType.currentVf !== c.libraryVf && (
          <p className="mt-1 font-semibold text-warn">
            The library has changed since: it is now {formatVf(c.cableType.currentVf)}. Accepting replaces that value with {formatVf(c.vf, 4)}.
          </p>
        )}
        {c.note && <p className="mt-1">{lengthsInText(c.note, unit)}</p>}
        {c.status !== 'pending' && (
          <p className="mt-1 text-mist">
            {c.status === 'accepted' ? 'Accepted' : 'Rejected'} by {c.reviewedBy?.name ?? '—'} {formatDateTime(c.reviewedAt)}
            {c.reviewReason ? `: ${c.reviewReason}` : ''}
          </p>
        )}
      </div>
      {c.status === 'pending' && <Decide c={c} onDone={onDone} />}
    </li>
  );
}

/** The planners' review queue: field calibrations waiting to be accepted into the library or rejected. */
export function CalibrationsPage() {
  const { unit } = useSession();
  const [status, setStatus] = useState<CalibrationStatus | 'all'>('pending');
  const [page, setPage] = useState(1);
  const list = useCalibrations({ status, page });
  // A decided calibration leaves the Waiting list at once: what became of it is said here.
  const [done, setDone] = useState<string | null>(null);
  return (
    <>
      <PageHeader title="Calibrations" subtitle="Field calibrations on known lengths. Accepting one sets the cable type's VF; the history keeps the old value." />
      <Card>
        <div role="tablist" aria-label="Status" className="mb-2 flex flex-wrap gap-2">
          {TABS.map((t) => (
            <button
              key={t.status}
              role="tab"
              type="button"
              aria-selected={status === t.status}
              onClick={() => (setStatus(t.status), setPage(1), setDone(null))}
              className={`min-h-11 rounded-md px-4 text-sm font-semibold ${status === t.status ? 'bg-ink text-white' : 'border border-rule bg-card hover:border-ink-soft'}`}
            >
              {t.label}
            </button>
          ))}
        </div>
        {done && (
          <Notice tone="ok" className="mb-2">
            {done}
          </Notice>
        )}
        {list.isPending ? (
          <Loading />
        ) : list.error ? (
          <ErrorNotice error={list.error} onRetry={() => void list.refetch()} retrying={list.isFetching} />
        ) : list.data.total === 0 ? (
          <Notice tone="info">{status === 'pending' ? 'Nothing is waiting for review.' : 'No calibrations here.'}</Notice>
        ) : (
          <>
            <ul>
              {list.data.items.map((c) => (
                <CalibrationItem key={c.id} c={c} unit={unit} onDone={setDone} />
              ))}
            </ul>
            <Pager page={page} pageSize={list.data.pageSize} total={list.data.total} onPage={setPage} />
          </>
        )}
      </Card>
    </>
  );
}
export default CalibrationsPage;
