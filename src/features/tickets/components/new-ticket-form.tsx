import { useState, type FormEvent } from 'react';
import { FINDING_KIND_LABELS } from '../../../../shared/schemas/findings';
import type { TicketDetail, UnticketedFinding } from '../../../../shared/schemas/tickets';
import { TICKET_PRIORITIES, TICKET_PRIORITY_LABELS, type TicketPriority } from '../../../../shared/tickets/status';
import { Button } from '../../../components/ui/button';
import { fieldErrors, SelectField, TextAreaField, TextField } from '../../../components/ui/field';
import { ErrorNotice, Loading } from '../../../components/ui/notice';
import { DigCaution } from '../../../components/ui/safety-caution';
import { routeWords } from '../../findings/components/where-to-dig';
import { formatDateTime, formatLength, type LengthUnit } from '../../../lib/format';
import { useAssignable } from '../api/list-assignable';
import { useUnticketedFindings } from '../api/list-unticketed-findings';
import { useCreateTicket } from '../api/save-ticket';

const kindLabel = (k: string) => FINDING_KIND_LABELS[k as keyof typeof FINDING_KIND_LABELS] ?? k;
const digWords = (f: UnticketedFinding, unit: LengthUnit) => routeWords(f.routePosition, f.routePositionText, unit).sentence;

/** Supervisors: pick confirmed findings nobody has a ticket for, then who, how urgent and by when. */
export function NewTicketForm({ unit, preselect, onCreated }: { unit: LengthUnit; preselect?: number; onCreated: (t: TicketDetail) => void }) {
  const findings = useUnticketedFindings();
  const people = useAssignable();
  const create = useCreateTicket();
  const [picked, setPicked] = useState<number[]>(preselect ? [preselect] : []);
  const [assigneeId, setAssigneeId] = useState('');
  const [priority, setPriority] = useState<TicketPriority>('normal');
  const [dueDate, setDueDate] = useState('');
  const [notes, setNotes] = useState('');
  const errors = fieldErrors(create.error);
  const runOfPicked = findings.data?.find((f) => picked.includes(f.id))?.cableRun.id;

  const toggle = (f: UnticketedFinding) => setPicked((p) => (p.includes(f.id) ? p.filter((x) => x !== f.id) : [...p, f.id]));
  const submit = (e: FormEvent) => {
    e.preventDefault();
    create.mutate(
      { findingIds: picked, assigneeId: assigneeId ? Number(assigneeId) : null, priority, dueDate: dueDate || null, notes: notes || null },
      {
        onSuccess: (t) => {
          setPicked([]);
          setNotes('');
          onCreated(t);
        },
      },
    );
  };

  if (findings.isPending) return <Loading what="Loading findings" />;
  if (findings.error) return <ErrorNotice error={findings.error} onRetry={() => void findings.refetch()} retrying={findings.isFetching} />;
  if (findings.data.length === 0) return <p className="text-sm text-mist">Every confirmed finding is on a ticket.</p>;

  return (
    <form onSubmit={submit} className="space-y-3" aria-label="Raise a ticket">
      <fieldset>
        <legend className="mb-1 text-sm font-semibold text-ink-soft">Findings to repair (one cable run)</legend>
        <ul className="max-h-72 space-y-1 overflow-y-auto">
          {findings.data.map((f) => {
            const otherRun = runOfPicked !== undefined && f.cableRun.id !== runOfPicked;
            return (
              <li key={f.id}>
                <label className={`flex min-h-11 items-start gap-3 rounded border border-rule px-3 py-2 text-sm ${otherRun ? 'opacity-50' : 'hover:border-copper'}`}>
                  <input type="checkbox" className="mt-1 h-5 w-5 accent-copper" checked={picked.includes(f.id)} disabled={otherRun} onChange={() => toggle(f)} aria-label={`Finding ${f.id}`} />
                  <span>
                    <span className="font-semibold">
                      {kindLabel(f.kind)} at {formatLength(f.distanceM, unit)} from end {f.measuredFrom}
                    </span>
                    <span className="block text-xs text-mist">
                      {f.site.name} · {f.cableRun.name} · confirmed {formatDateTime(f.confirmedAt)} by {f.confirmedBy.name}
                    </span>
                    {/* Where the crew will dig, so the ticket is raised knowing what it sends them to. */}
                    {digWords(f, unit) && (
                      <span className="mt-0.5 block text-xs" data-testid={`new-ticket-dig-${f.id}`}>
                        Dig: {digWords(f, unit)}
                      </span>
                    )}
                  </span>
                </label>
              </li>
            );
          })}
        </ul>
        {errors.findingIds && <p className="mt-1 text-xs font-semibold text-danger">{errors.findingIds}</p>}
      </fieldset>
      <SelectField label="Assign to" value={assigneeId} onChange={(e) => setAssigneeId(e.target.value)} error={errors.assigneeId}>
        <option value="">Nobody yet</option>
        {people.data?.map((p) => (
          <option key={p.id} value={p.id}>
            {p.name}
          </option>
        ))}
      </SelectField>
      <div className="grid gap-3 sm:grid-cols-2">
        <SelectField label="Priority" value={priority} onChange={(e) => setPriority(e.target.value as TicketPriority)} error={errors.priority}>
          {TICKET_PRIORITIES.map((p) => (
            <option key={p} value={p}>
              {TICKET_PRIORITY_LABELS[p]}
            </option>
          ))}
        </SelectField>
        <TextField label="Due by" type="date" value={dueDate} onChange={(e) => setDueDate(e.target.value)} error={errors.dueDate} />
      </div>
      <TextAreaField label="Notes for the crew" value={notes} onChange={(e) => setNotes(e.target.value)} error={errors.notes} />
      {/* The ticket sends a crew to dig: the caution goes with it from the start. */}
      <DigCaution />
      {create.error && !Object.keys(errors).length && <ErrorNotice error={create.error} />}
      <Button type="submit" disabled={create.isPending || picked.length === 0} aria-describedby={picked.length === 0 ? 'new-ticket-missing' : undefined}>
        Raise ticket
      </Button>
      {/* Said under the button while it cannot be pressed, so nobody is left guessing why it is grey. */}
      {picked.length === 0 && (
        <p id="new-ticket-missing" className="text-sm text-ink-soft" data-testid="new-ticket-missing">
          Still needed: at least one finding to repair.
        </p>
      )}
    </form>
  );
}
