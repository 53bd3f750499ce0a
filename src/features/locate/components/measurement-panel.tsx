import { useState } from 'react';
import { MEASUREMENT_KIND_LABELS, type MeasurementView } from '../../../../shared/schemas/measurements';
import { Button } from '../../../components/ui/button';
import { TextField } from '../../../components/ui/field';
import { Badge, ErrorNotice, Loading } from '../../../components/ui/notice';
import { SafetyCaution } from '../../../components/ui/safety-caution';
import { formatDateTime, formatLength, formatLengthRange, lengthsInText, type LengthUnit } from '../../../lib/format';
import { useMeasurements } from '../api/list-measurements';
import { useCorrectMeasurement, useRecordMeasurement, useWithdrawMeasurement } from '../api/save-measurement';
import { emptyMeasurementForm, formToReadings, MeasurementForm, measurementToForm, type MeasurementFormState } from './measurement-form';

const STATUS_WORDS = { active: 'in use', corrected: 'corrected', withdrawn: 'withdrawn' } as const;

function Estimate({ m, unit }: { m: MeasurementView; unit: LengthUnit }) {
  if (m.estimateError) return <p className="text-sm text-danger">{lengthsInText(m.estimateError, unit)}</p>;
  if (!m.estimate) return null;
  return (
    <p className="text-sm tabular">
      <span className="font-semibold">{formatLength(m.estimate.distanceFromEndM, unit)}</span> from end {m.estimate.fromEnd}, ± {formatLength(m.estimate.standardUncertaintyM, unit)} · 95 % window{' '}
      {formatLengthRange(m.estimate.windowStartM, m.estimate.windowEndM, unit)} from A
    </p>
  );
}

/** Withdraw a reading, with the reason kept in its history. */
function WithdrawBox({ m, unit, onDone }: { m: MeasurementView; unit: LengthUnit; onDone: () => void }) {
  const withdraw = useWithdrawMeasurement();
  const [reason, setReason] = useState('');
  return (
    <form
      className="mt-2 space-y-2"
      aria-label={`Withdraw reading ${m.id}`}
      onSubmit={(e) => {
        e.preventDefault();
        withdraw.mutate({ id: m.id, reason }, { onSuccess: onDone });
      }}
    >
      <TextField label="Why it is withdrawn" value={reason} onChange={(e) => setReason(e.target.value)} />
      {withdraw.error && <ErrorNotice error={withdraw.error} unit={unit} />}
      <div className="flex flex-wrap gap-2">
        <Button type="submit" variant="danger" disabled={withdraw.isPending}>
          Withdraw the reading
        </Button>
        <Button variant="secondary" onClick={onDone}>
          Cancel
        </Button>
      </div>
    </form>
  );
}

function ReadingItem({
  m,
  unit,
  installedLengthM,
  mayChange,
}: {
  m: MeasurementView;
  unit: LengthUnit;
  installedLengthM: number;
  mayChange: boolean;
}) {
  const [mode, setMode] = useState<'view' | 'correct' | 'withdraw'>('view');
  const correct = useCorrectMeasurement();
  const active = m.status === 'active';
  return (
    <li className={`rounded-md border p-3 ${active ? 'border-rule' : 'border-dashed border-rule text-ink-soft'}`} data-testid="measurement">
      <p className="flex flex-wrap items-center gap-2">
        <span className="font-semibold">
          {MEASUREMENT_KIND_LABELS[m.kind]} from end {m.readings.fromEnd} (reading {m.id})
        </span>
        <Badge tone={active ? 'ok' : 'plain'}>{STATUS_WORDS[m.status]}</Badge>
      </p>
      {active && <Estimate m={m} unit={unit} />}
      <p className="text-xs text-mist">
        {m.recordedBy.name} · measured {formatDateTime(m.measuredAt)} · {m.instrument}
        {m.supersedesId !== null && ` · corrects reading ${m.supersedesId}: ${m.changeReason}`}
      </p>
      {m.note && <p className="text-sm">{m.note}</p>}
      {m.status === 'withdrawn' && (
        <p className="text-xs">
          Withdrawn by {m.withdrawnBy?.name}, {formatDateTime(m.withdrawnAt)}: {m.withdrawReason}
        </p>
      )}
      {active && mayChange && mode === 'view' && (
        <div className="mt-2 flex flex-wrap gap-2">
          <Button variant="secondary" onClick={() => setMode('correct')}>
            Correct
          </Button>
          <Button variant="ghost" onClick={() => setMode('withdraw')}>
            Withdraw
          </Button>
        </div>
      )}
      {mode === 'withdraw' && <WithdrawBox m={m} unit={unit} onDone={() => setMode('view')} />}
      {mode === 'correct' && (
        <div className="mt-3 border-t border-rule pt-3">
          <MeasurementForm
            initial={measurementToForm(m, installedLengthM, unit)}
            unit={unit}
            correcting
            pending={correct.isPending}
            error={correct.error}
            onCancel={() => setMode('view')}
            onSubmit={(f, reason) =>
              correct.mutate(
                { id: m.id, ...formToReadings(f, unit), instrument: f.instrument, measuredAt: new Date(f.measuredAt).toISOString(), note: f.note, reason } as Parameters<typeof correct.mutate>[0],
                { onSuccess: () => setMode('view') },
              )
            }
          />
        </div>
      )}
    </li>
  );
}

/**
 * Bridge, capacitance and resistance readings of this fault: the form to
 * record one (with the safety caution: these connect an instrument to the
 * cable) and every reading with its history, corrections and withdrawals.
 */
export function MeasurementPanel({
  findingId,
  installedLengthM,
  unit,
  userId,
  mayRecord,
  mayReview,
}: {
  findingId: number;
  installedLengthM: number;
  unit: LengthUnit;
  userId: number;
  mayRecord: boolean;
  mayReview: boolean;
}) {
  const list = useMeasurements(findingId);
  const record = useRecordMeasurement();
  const [open, setOpen] = useState(false);
  const [formKey, setFormKey] = useState(0);
  const submit = (f: MeasurementFormState) =>
    record.mutate(
      { findingId, ...formToReadings(f, unit), instrument: f.instrument, measuredAt: new Date(f.measuredAt).toISOString(), note: f.note } as Parameters<typeof record.mutate>[0],
      {
        onSuccess: () => {
          setOpen(false);
          setFormKey((k) => k + 1);
        },
      },
    );
  return (
    <div className="space-y-3">
      {list.isPending ? (
        <Loading what="Loading the readings" />
      ) : list.error ? (
        <ErrorNotice error={list.error} onRetry={() => void list.refetch()} retrying={list.isFetching} />
      ) : list.data.length === 0 ? (
        <p className="text-sm text-mist">No bridge, capacitance or resistance reading of this fault yet.</p>
      ) : (
        <ul className="space-y-2" data-testid="measurements">
          {[...list.data].reverse().map((m) => (
            <ReadingItem key={m.id} m={m} unit={unit} installedLengthM={installedLengthM} mayChange={mayRecord && (m.recordedBy.id === userId || mayReview)} />
          ))}
        </ul>
      )}
      {mayRecord &&
        (open ? (
          <div className="space-y-3 border-t border-rule pt-3">
            <SafetyCaution compact />
            <MeasurementForm key={formKey} initial={emptyMeasurementForm(installedLengthM, unit)} unit={unit} correcting={false} pending={record.isPending} error={record.error} onSubmit={submit} onCancel={() => setOpen(false)} />
          </div>
        ) : (
          <Button variant="secondary" onClick={() => setOpen(true)}>
            Record a bridge, capacitance or resistance reading
          </Button>
        ))}
    </div>
  );
}
