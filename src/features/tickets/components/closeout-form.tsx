import { useMemo, useState, type FormEvent } from 'react';
import type { MarkerKind } from '../../../../shared/schemas/sites';
import { FINDING_KIND_LABELS, FINDING_KINDS } from '../../../../shared/schemas/findings';
import type { CloseoutInput, TicketDetail } from '../../../../shared/schemas/tickets';
import { CloseoutInputError, compareLocatedFound, type FoundPosition } from '../../../../shared/tickets/closeout';
import { Button } from '../../../components/ui/button';
import { fieldErrors, SelectField, TextAreaField, TextField } from '../../../components/ui/field';
import { ErrorNotice } from '../../../components/ui/notice';
import { markerPhrase } from '../../../../shared/field/route-position';
import { formatLength, formatSignedLength, fromUnit, lengthsInText, markerKindTitle, type LengthUnit } from '../../../lib/format';
import { useCloseOutTicket } from '../api/save-ticket';

function parseNumber(s: string): number | null {
  const v = Number(s.replace(',', '.'));
  return s.trim() !== '' && Number.isFinite(v) ? v : null;
}

/** The crew's record of the repair: where the fault really was, what it was, what was done. */
export function CloseoutForm({ ticket, unit, onDone }: { ticket: TicketDetail; unit: LengthUnit; onDone?: () => void }) {
  const run = ticket.cableRun;
  const [findingId, setFindingId] = useState(ticket.findings[0]?.id);
  const [method, setMethod] = useState<'marker' | 'distance'>(run.markers.length ? 'marker' : 'distance');
  const [markerId, setMarkerId] = useState<number | undefined>(run.markers[0]?.id);
  const [offset, setOffset] = useState('');
  const [fromEnd, setFromEnd] = useState<'A' | 'B'>(ticket.findings[0]?.measuredFrom ?? 'A');
  const [distance, setDistance] = useState('');
  const [cause, setCause] = useState<(typeof FINDING_KINDS)[number]>((ticket.findings[0]?.kind as (typeof FINDING_KINDS)[number]) ?? 'other');
  const [workDone, setWorkDone] = useState('');
  const [comment, setComment] = useState('');
  const [fileCalibration, setFileCalibration] = useState(true);
  const save = useCloseOutTicket();
  const errors = fieldErrors(save.error, unit);
  const finding = ticket.findings.find((f) => f.id === findingId) ?? ticket.findings[0];

  const found: FoundPosition | null = useMemo(() => {
    if (method === 'marker') {
      const v = parseNumber(offset);
      return markerId && v !== null ? { method: 'marker', markerId, offsetM: fromUnit(v, unit) } : null;
    }
    const v = parseNumber(distance);
    return v !== null ? { method: 'distance', fromEnd, distanceM: fromUnit(v, unit) } : null;
  }, [method, markerId, offset, fromEnd, distance, unit]);

  const preview = useMemo(() => {
    if (!found || !finding) return null;
    try {
      return {
        ok: true as const,
        r: compareLocatedFound(
          { installedLengthM: run.installedLengthM, markers: run.markers.map((m) => ({ ...m, kind: m.kind as MarkerKind })) },
          { measuredFrom: finding.measuredFrom, distanceM: finding.distanceM, roundTripNs: finding.roundTripNs },
          found,
        ),
      };
    } catch (e) {
      return { ok: false as const, field: e instanceof CloseoutInputError ? e.field : 'found', message: (e as Error).message };
    }
  }, [found, finding, run]);
  // What is wrong with the position as typed, under the field it is about: the server's answer to the same
  // position says the same thing in the same place, so it is never shown twice.
  const positionError = (field: string): string | undefined =>
    preview && !preview.ok && preview.field === field ? lengthsInText(preview.message, unit) : errors[field];
  // A change to the position makes the last answer about it out of date.
  const editing = <T,>(set: (v: T) => void) => (v: T) => {
    if (save.error) save.reset();
    set(v);
  };

  const submit = (e: FormEvent) => {
    e.preventDefault();
    if (!found) return;
    const input: CloseoutInput = { findingId: finding?.id, found, cause, workDone, fileCalibration, comment: comment || null };
    save.mutate({ id: ticket.id, ...input }, { onSuccess: () => onDone?.() });
  };

  // Said under the button while it cannot be pressed, so nobody is left guessing why it is grey.
  const missing = found
    ? []
    : method === 'marker'
      ? [!markerId && 'the route marker', parseNumber(offset) === null && 'the distance past it toward end B'].filter((m): m is string => !!m)
      : ['the cable length to the fault'];

  const endLabel = (end: 'A' | 'B') => `End ${end} (${end === 'A' ? run.endALabel : run.endBLabel})`;

  return (
    <form onSubmit={submit} className="space-y-4" aria-label="Close-out">
      {ticket.findings.length > 1 && (
        <SelectField label="Which reading does this answer?" value={findingId} onChange={(e) => setFindingId(Number(e.target.value))} error={errors.findingId}>
          {ticket.findings.map((f) => (
            <option key={f.id} value={f.id}>
              Finding {f.id}: {formatLength(f.distanceM, unit)} from end {f.measuredFrom}
            </option>
          ))}
        </SelectField>
      )}
      <fieldset className="space-y-3">
        <legend className="text-sm font-semibold text-ink-soft">Where was the fault found?</legend>
        <div className="flex flex-wrap gap-2" role="radiogroup" aria-label="How the position is given">
          <Button variant={method === 'marker' ? 'primary' : 'secondary'} aria-pressed={method === 'marker'} onClick={() => editing(setMethod)('marker')} disabled={!run.markers.length}>
            From a route marker
          </Button>
          <Button variant={method === 'distance' ? 'primary' : 'secondary'} aria-pressed={method === 'distance'} onClick={() => editing(setMethod)('distance')}>
            Cable length from an end
          </Button>
        </div>
        {method === 'marker' ? (
          <div className="grid gap-3 sm:grid-cols-2">
            {/* The distance leads and the words about it sit under the field, so a phone's narrow select still shows it. */}
            <SelectField
              label="Route marker"
              value={markerId}
              onChange={(e) => editing(setMarkerId)(Number(e.target.value))}
              error={positionError('found.markerId')}
              hint={`Distances from end A (${run.endALabel}), on the ground.`}
            >
              {run.markers.map((m) => (
                <option key={m.id} value={m.id}>
                  {formatLength(m.chainageM, unit)} · {markerPhrase(markerKindTitle(m.kind), m.label)}
                </option>
              ))}
            </SelectField>
            <TextField
              label={`Distance past it toward end B (${unit})`}
              inputMode="decimal"
              value={offset}
              onChange={(e) => editing(setOffset)(e.target.value)}
              error={positionError('found.offsetM')}
              hint="Measured along the ground, as you walked it."
              required
            />
          </div>
        ) : (
          <div className="grid gap-3 sm:grid-cols-2">
            <SelectField label="Measured from" value={fromEnd} onChange={(e) => editing(setFromEnd)(e.target.value as 'A' | 'B')}>
              <option value="A">{endLabel('A')}</option>
              <option value="B">{endLabel('B')}</option>
            </SelectField>
            <TextField
              label={`Cable length to the fault (${unit})`}
              inputMode="decimal"
              value={distance}
              onChange={(e) => editing(setDistance)(e.target.value)}
              error={positionError('found.distanceM')}
              hint="Length of cable, slack included."
              required
            />
          </div>
        )}
        {positionError('found') && <p className="text-xs font-semibold text-danger">{positionError('found')}</p>}
      </fieldset>

      {preview?.ok && finding && (
        <div className="grid grid-cols-2 gap-3 rounded-md border border-rule bg-paper p-3 text-sm sm:grid-cols-4" data-testid="closeout-preview">
          <div>
            <p className="text-xs text-mist">Found</p>
            <p className="font-semibold tabular">{formatLength(preview.r.foundDistanceM, unit)}</p>
          </div>
          <div>
            <p className="text-xs text-mist">Located</p>
            <p className="font-semibold tabular">{formatLength(preview.r.locatedDistanceM, unit)}</p>
          </div>
          <div>
            <p className="text-xs text-mist">Located − found</p>
            <p className="font-semibold tabular">
              {formatSignedLength(preview.r.errorM, unit)}
            </p>
          </div>
          <div>
            <p className="text-xs text-mist">Implied velocity factor</p>
            <p className="font-semibold tabular">{preview.r.impliedVf?.toFixed(3) ?? '—'}</p>
          </div>
          <p className="col-span-full text-xs text-mist">Cable length from end {finding.measuredFrom}, the end the reading was taken from. The reading used VF {finding.vf.toFixed(3)}.</p>
        </div>
      )}

      <SelectField label="What was it?" value={cause} onChange={(e) => setCause(e.target.value as typeof cause)} error={errors.cause}>
        {FINDING_KINDS.map((k) => (
          <option key={k} value={k}>
            {FINDING_KIND_LABELS[k]}
          </option>
        ))}
      </SelectField>
      <TextAreaField label="What was done" value={workDone} onChange={(e) => setWorkDone(e.target.value)} error={errors.workDone} required />
      <TextAreaField label="Comment for the timeline (optional)" value={comment} onChange={(e) => setComment(e.target.value)} />
      <label className="flex min-h-11 items-start gap-3 text-sm">
        <input type="checkbox" className="mt-1 h-5 w-5 accent-copper" checked={fileCalibration} onChange={(e) => setFileCalibration(e.target.checked)} />
        <span>
          <span className="font-semibold">File the implied velocity factor as a field calibration</span>
          <span className="block text-xs text-mist">Untick if the fault you found is not the one the reading located.</span>
        </span>
      </label>
      {save.error && !Object.keys(errors).length && <ErrorNotice error={save.error} unit={unit} />}
      <Button type="submit" disabled={save.isPending || missing.length > 0} aria-describedby={missing.length > 0 ? 'closeout-missing' : undefined}>
        Record the repair
      </Button>
      {missing.length > 0 && (
        <p id="closeout-missing" className="text-sm text-ink-soft" data-testid="closeout-missing">
          Still needed: {missing.join(', ').replace(/, ([^,]*)$/, ' and $1')}.
        </p>
      )}
    </form>
  );
}
