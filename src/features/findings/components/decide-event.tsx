import { useState, type FormEvent } from 'react';
import { Link } from 'react-router-dom';
import { FINDING_KIND_LABELS, FINDING_KINDS } from '../../../../shared/schemas/findings';
import type { ReflectionType } from '../../../../shared/schemas/trace-analysis';
import { Button } from '../../../components/ui/button';
import { ConfirmDialog } from '../../../components/ui/confirm-dialog';
import { fieldErrors, SelectField, TextAreaField } from '../../../components/ui/field';
import { ErrorNotice } from '../../../components/ui/notice';
import { describeError } from '../../../lib/api-client';
import { useRecordFinding } from '../api/record-finding';

const KIND_FOR_TYPE: Record<ReflectionType, (typeof FINDING_KINDS)[number]> = {
  open: 'open-conductor',
  short: 'short-circuit',
  'impedance-rise': 'high-resistance',
  'impedance-drop': 'water-ingress',
};

/** Confirm an event as a fault, or dismiss it, with a kind and a note. */
export function DecideEvent({
  traceId,
  eventIndex,
  type,
  findingLink,
}: {
  traceId: number;
  eventIndex: number;
  type: ReflectionType;
  findingLink: (id: number) => string;
}) {
  const [kind, setKind] = useState<(typeof FINDING_KINDS)[number]>(KIND_FOR_TYPE[type]);
  const [note, setNote] = useState('');
  const [askingDismiss, setAskingDismiss] = useState(false);
  const record = useRecordFinding();
  const errors = fieldErrors(record.error);

  if (record.data) {
    return (
      <p className="rounded-md bg-ok-light px-3 py-2 font-semibold text-ok" role="status">
        {record.data.status === 'confirmed' ? 'Confirmed as a fault.' : 'Dismissed.'}{' '}
        <Link className="text-teal underline" to={findingLink(record.data.id)}>
          Open the finding
        </Link>
      </p>
    );
  }
  const dismissKind = kind === KIND_FOR_TYPE[type] ? 'not-a-fault' : kind;
  const decide = (status: 'confirmed' | 'dismissed') => (e?: FormEvent) => {
    e?.preventDefault();
    record.mutate({ traceId, eventIndex, status, kind: status === 'dismissed' ? dismissKind : kind, note });
  };
  return (
    <form className="space-y-3" onSubmit={decide('confirmed')} aria-label={`Decide event ${eventIndex + 1}`}>
      <SelectField label="What is it?" value={kind} onChange={(e) => setKind(e.target.value as typeof kind)} error={errors.kind}>
        {FINDING_KINDS.map((k) => (
          <option key={k} value={k}>
            {FINDING_KIND_LABELS[k]}
          </option>
        ))}
      </SelectField>
      <TextAreaField label="Note (optional)" value={note} onChange={(e) => setNote(e.target.value)} error={errors.note} rows={2} />
      {record.error && !askingDismiss && <ErrorNotice error={record.error} />}
      <div className="grid grid-cols-2 gap-2">
        <Button type="submit" className="min-h-14 text-base" disabled={record.isPending}>
          Confirm fault
        </Button>
        <Button variant="secondary" className="min-h-14 text-base" disabled={record.isPending} onClick={() => setAskingDismiss(true)}>
          Dismiss…
        </Button>
      </div>
      <ConfirmDialog
        open={askingDismiss}
        title={`Dismiss event ${eventIndex + 1}?`}
        confirmLabel="Dismiss the event"
        pending={record.isPending}
        error={record.error ? describeError(record.error) : null}
        onCancel={() => (setAskingDismiss(false), record.reset())}
        onConfirm={() => decide('dismissed')()}
      >
        <p>
          It is recorded as <strong>{FINDING_KIND_LABELS[dismissKind]}</strong>, not a fault to dig for: no supervisor is e-mailed and no repair ticket can be raised from it.
        </p>
        <p>Only a supervisor can reverse the decision later, giving a reason that stays in its history.</p>
      </ConfirmDialog>
    </form>
  );
}
