import { useState, type FormEvent } from 'react';
import { FINDING_KIND_LABELS, FINDING_KINDS, type FindingView } from '../../../../shared/schemas/findings';
import { Button } from '../../../components/ui/button';
import { Card } from '../../../components/ui/card';
import { fieldErrors, SelectField, TextAreaField } from '../../../components/ui/field';
import { ConfirmDialog } from '../../../components/ui/confirm-dialog';
import { ErrorNotice } from '../../../components/ui/notice';
import { describeError } from '../../../lib/api-client';
import { formatDateTime } from '../../../lib/format';
import { useFindingDecisions } from '../api/get-decisions';
import { useReverseDecision } from '../api/reverse-decision';

type Kind = (typeof FINDING_KINDS)[number];
const kindLabel = (k: string) => FINDING_KIND_LABELS[k as Kind] ?? k;
const statusWord = (s: string) => (s === 'confirmed' ? 'confirmed as a fault' : 'dismissed');

/** Every decision on the event, oldest first, and for a supervisor a way to reverse the current one with a reason. */
export function DecisionHistory({ finding, mayReverse }: { finding: FindingView; mayReverse: boolean }) {
  const history = useFindingDecisions(finding.id);
  return (
    <Card title="Decision history">
      {history.error && <ErrorNotice error={history.error} onRetry={() => void history.refetch()} retrying={history.isFetching} />}
      <ol className="space-y-2 text-sm">
        {(history.data ?? []).map((d) => (
          <li key={d.id} className="border-l-2 border-rule pl-3">
            <span className="font-semibold">{d.action === 'reversed' ? 'Reversed' : 'Decided'}</span>: {statusWord(d.toStatus)} ({kindLabel(d.kind)}) by{' '}
            {d.decidedBy.name}, {formatDateTime(d.at)}
            {d.reason && <p className="whitespace-pre-wrap text-ink-soft">Reason: {d.reason}</p>}
          </li>
        ))}
      </ol>
      {mayReverse && <ReverseForm finding={finding} />}
    </Card>
  );
}

function ReverseForm({ finding }: { finding: FindingView }) {
  const toConfirm = finding.status === 'dismissed';
  const [open, setOpen] = useState(false);
  const [checking, setChecking] = useState(false);
  const [reason, setReason] = useState('');
  const [kind, setKind] = useState<Kind>(toConfirm ? (finding.kind === 'not-a-fault' ? 'other' : (finding.kind as Kind)) : 'not-a-fault');
  const reverse = useReverseDecision();
  const errors = fieldErrors(reverse.error);
  const reasonTooShort = reason.trim().length < 10;

  if (!open) {
    return (
      <Button variant="secondary" className="mt-3" onClick={() => setOpen(true)}>
        {toConfirm ? 'Reverse: confirm as a fault…' : 'Reverse: dismiss this fault…'}
      </Button>
    );
  }
  const submit = (e: FormEvent) => {
    e.preventDefault();
    setChecking(true);
  };
  return (
    <form className="mt-3 space-y-3" onSubmit={submit} aria-label="Reverse the decision">
      <SelectField label={toConfirm ? 'What fault is it?' : 'What is it instead?'} value={kind} onChange={(e) => setKind(e.target.value as Kind)} error={errors.kind}>
        {FINDING_KINDS.filter((k) => (toConfirm ? k !== 'not-a-fault' : true)).map((k) => (
          <option key={k} value={k}>
            {FINDING_KIND_LABELS[k]}
          </option>
        ))}
      </SelectField>
      <TextAreaField
        label="Reason (kept in the history)"
        hint="At least 10 characters: what you saw that the first decision missed."
        value={reason}
        onChange={(e) => setReason(e.target.value)}
        error={errors.reason}
        rows={3}
      />
      {reverse.error && !checking && <ErrorNotice error={reverse.error} />}
      <div className="flex flex-wrap gap-2">
        <Button type="submit" disabled={reasonTooShort || reverse.isPending}>
          Reverse the decision…
        </Button>
        <Button variant="ghost" onClick={() => setOpen(false)}>
          Cancel
        </Button>
      </div>
      <ConfirmDialog
        open={checking}
        title={`Reverse the decision on finding ${finding.id}?`}
        confirmLabel={toConfirm ? 'Confirm it as a fault' : 'Dismiss the fault'}
        pending={reverse.isPending}
        error={reverse.error ? describeError(reverse.error) : null}
        onCancel={() => (setChecking(false), reverse.reset())}
        onConfirm={() =>
          reverse.mutate({ id: finding.id, to: toConfirm ? 'confirmed' : 'dismissed', reason: reason.trim(), kind }, { onSuccess: () => (setOpen(false), setChecking(false), setReason('')) })
        }
      >
        <p>
          Finding {finding.id} will be {statusWord(toConfirm ? 'confirmed' : 'dismissed')} ({kindLabel(kind)}).
          {toConfirm ? ' The site’s supervisors are e-mailed, as for a new fault.' : ' It will no longer count as a fault to dig for.'}
        </p>
        <p>The first decision and your reason stay in the history.</p>
      </ConfirmDialog>
    </form>
  );
}
