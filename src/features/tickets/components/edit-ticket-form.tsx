import { useState, type FormEvent } from 'react';
import type { TicketDetail } from '../../../../shared/schemas/tickets';
import { TICKET_PRIORITIES, TICKET_PRIORITY_LABELS, type TicketPriority } from '../../../../shared/tickets/status';
import { Button } from '../../../components/ui/button';
import { fieldErrors, SelectField, TextAreaField, TextField } from '../../../components/ui/field';
import { ErrorNotice } from '../../../components/ui/notice';
import { useAssignable } from '../api/list-assignable';
import { useUpdateTicket } from '../api/save-ticket';

/** Supervisors: who does it, how urgent, by when. Sends only what changed, with the values it started from. */
export function EditTicketForm({ ticket }: { ticket: TicketDetail }) {
  const people = useAssignable();
  const update = useUpdateTicket();
  const [assigneeId, setAssigneeId] = useState(ticket.assignee ? String(ticket.assignee.id) : '');
  const [priority, setPriority] = useState<TicketPriority>(ticket.priority);
  const [dueDate, setDueDate] = useState(ticket.dueDate ?? '');
  const [notes, setNotes] = useState(ticket.notes ?? '');
  const [comment, setComment] = useState('');
  const errors = fieldErrors(update.error);

  const patch = {
    ...(assigneeId !== (ticket.assignee ? String(ticket.assignee.id) : '') ? { assigneeId: assigneeId ? Number(assigneeId) : null } : {}),
    ...(priority !== ticket.priority ? { priority } : {}),
    ...(dueDate !== (ticket.dueDate ?? '') ? { dueDate: dueDate || null } : {}),
    ...(notes !== (ticket.notes ?? '') ? { notes: notes || null } : {}),
  };
  const changed = Object.keys(patch).length > 0;
  const submit = (e: FormEvent) => {
    e.preventDefault();
    // What the form was opened with, for each field it changes: another supervisor's change made meanwhile is refused
    // (409) rather than overwritten unseen.
    const opened = { assigneeId: ticket.assignee?.id ?? null, priority: ticket.priority, dueDate: ticket.dueDate, notes: ticket.notes };
    const basedOn = Object.fromEntries(Object.keys(patch).map((k) => [k, opened[k as keyof typeof opened]]));
    update.mutate({ id: ticket.id, ...patch, comment: comment || null, basedOn }, { onSuccess: () => setComment('') });
  };

  return (
    <form onSubmit={submit} className="space-y-3" aria-label="Assign and plan">
      <SelectField label="Assignee" value={assigneeId} onChange={(e) => setAssigneeId(e.target.value)} error={errors.assigneeId}>
        <option value="">Nobody</option>
        {people.data?.map((p) => (
          <option key={p.id} value={p.id}>
            {p.name}
          </option>
        ))}
      </SelectField>
      <div className="grid gap-3 sm:grid-cols-2">
        <SelectField label="Priority" value={priority} onChange={(e) => setPriority(e.target.value as TicketPriority)}>
          {TICKET_PRIORITIES.map((p) => (
            <option key={p} value={p}>
              {TICKET_PRIORITY_LABELS[p]}
            </option>
          ))}
        </SelectField>
        <TextField label="Due by" type="date" value={dueDate} onChange={(e) => setDueDate(e.target.value)} error={errors.dueDate} />
      </div>
      <TextAreaField label="Notes for the crew" value={notes} onChange={(e) => setNotes(e.target.value)} error={errors.notes} />
      <TextField label="Why (optional, goes on the timeline)" value={comment} onChange={(e) => setComment(e.target.value)} />
      {update.error && !Object.keys(errors).length && <ErrorNotice error={update.error} />}
      <Button type="submit" disabled={!changed || update.isPending}>
        Save changes
      </Button>
    </form>
  );
}
