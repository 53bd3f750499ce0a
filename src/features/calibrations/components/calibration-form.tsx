import { useState, type FormEvent } from 'react';
import { CALIBRATION_VF_MAX, CALIBRATION_VF_MIN, vfFromKnownLengthNs } from '../../../../shared/cable/calibration';
import { Button } from '../../../components/ui/button';
import { fieldErrors, TextAreaField, TextField } from '../../../components/ui/field';
import { ErrorNotice, Notice } from '../../../components/ui/notice';
import { fromUnit, toUnit, type LengthUnit } from '../../../lib/format';
import { useSubmitCalibration } from '../api/submit-calibration';

/** What a trace gives a calibration: its cable-end reflection and the run's recorded length. */
export interface TraceCalibrationSource {
  traceId: number;
  roundTripNs: number;
  knownLengthM: number;
  /** Which cable type the trace's run uses, to warn when it is not this one. */
  cableTypeName: string;
  /** How the numbers were taken, kept in the note. */
  note: string;
}

function num(s: string): number | null {
  const t = s.trim().replace(',', '.');
  if (t === '') return null;
  return /^(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/.test(t) ? Number(t) : NaN;
}

const pct = (f: number) => `${f >= 0 ? '+' : '−'}${Math.abs(f * 100).toFixed(1)} %`;

/**
 * A technician's field calibration: a known length and the round-trip time of
 * its end reflection, typed or taken from an uploaded trace. The VF shows as
 * they type; it goes to the planners' review queue.
 */
export function CalibrationForm({
  cableType,
  unit,
  loadTrace,
}: {
  cableType: { id: number; name: string; vf: number };
  unit: LengthUnit;
  loadTrace?: (traceId: number) => Promise<TraceCalibrationSource>;
}) {
  const [length, setLength] = useState('');
  const [roundTrip, setRoundTrip] = useState('');
  const [note, setNote] = useState('');
  const [traceNo, setTraceNo] = useState('');
  const [fromTrace, setFromTrace] = useState<TraceCalibrationSource | null>(null);
  const [traceError, setTraceError] = useState<string | null>(null);
  const [loading, setLoading] = useState(false);
  const submit = useSubmitCalibration();
  const errors = fieldErrors(submit.error, unit);

  const lengthM = (() => {
    const v = num(length);
    return v === null || Number.isNaN(v) ? v : fromUnit(v, unit);
  })();
  const t = num(roundTrip);
  const vf = lengthM && t && lengthM > 0 && t > 0 ? vfFromKnownLengthNs(lengthM, t) : null;
  const deviation = vf !== null ? (vf - cableType.vf) / cableType.vf : null;

  const takeFromTrace = async () => {
    const id = Number(traceNo);
    if (!loadTrace || !Number.isInteger(id) || id <= 0) return setTraceError('Give the number of an uploaded trace.');
    setLoading(true);
    setTraceError(null);
    try {
      const src = await loadTrace(id);
      setFromTrace(src);
      setRoundTrip(String(Number(src.roundTripNs.toFixed(2))));
      setLength(String(Number(toUnit(src.knownLengthM, unit).toFixed(2))));
      setNote((n) => n || src.note);
    } catch (e) {
      setFromTrace(null);
      setTraceError((e as Error).message);
    } finally {
      setLoading(false);
    }
  };

  const onSubmit = (e: FormEvent) => {
    e.preventDefault();
    submit.mutate(
      {
        cableTypeId: cableType.id,
        knownLengthM: lengthM ?? Number.NaN,
        roundTripNs: t ?? Number.NaN,
        source: fromTrace ? 'trace' : 'manual',
        traceId: fromTrace?.traceId ?? null,
        ...(note.trim() ? { note: note.trim() } : {}),
      },
      {
        onSuccess: () => {
          setLength('');
          setRoundTrip('');
          setNote('');
          setFromTrace(null);
          setTraceNo('');
        },
      },
    );
  };

  return (
    <form onSubmit={onSubmit} className="space-y-3" aria-label="Record a field calibration" noValidate>
      {loadTrace && (
        <div className="flex flex-wrap items-end gap-2">
          <div className="min-w-40 flex-1">
            <TextField label="Take it from trace no. (optional)" inputMode="numeric" value={traceNo} onChange={(e) => setTraceNo(e.target.value)} error={traceError ?? undefined} />
          </div>
          <Button variant="secondary" onClick={takeFromTrace} disabled={loading}>
            Use its end reflection
          </Button>
        </div>
      )}
      {fromTrace && fromTrace.cableTypeName !== cableType.name && (
        <Notice tone="warn" title="Different cable type">
          Trace {fromTrace.traceId} was taken on a run of “{fromTrace.cableTypeName}”, not “{cableType.name}”.
        </Notice>
      )}
      <div className="grid gap-3 sm:grid-cols-2">
        <TextField
          label={`Known length (${unit})`}
          inputMode="decimal"
          value={length}
          onChange={(e) => (setLength(e.target.value), setFromTrace(null))}
          error={errors.knownLengthM}
          hint="From as-built records or a measured drum"
        />
        <TextField
          label="Round-trip time of its end reflection (ns)"
          inputMode="decimal"
          value={roundTrip}
          onChange={(e) => (setRoundTrip(e.target.value), setFromTrace(null))}
          error={errors.roundTripNs}
          hint="There and back, as the instrument shows it"
        />
      </div>
      <p className="text-sm tabular" aria-live="polite" data-testid="calibration-vf">
        {vf === null ? (
          <span className="text-mist">VF = 2L / (c·t) appears here as you type.</span>
        ) : (
          <>
            VF = 2L / (c·t) = <strong>{vf.toFixed(4)}</strong>
            <span className="text-mist">
              {' '}
              · library {cableType.vf.toFixed(3)} ({pct(deviation!)})
            </span>
            {vf > CALIBRATION_VF_MAX && <span className="block font-semibold text-danger">Faster than light: check the length and the time.</span>}
            {vf < CALIBRATION_VF_MIN && <span className="block font-semibold text-danger">Slower than any cable: check the units (ns, {unit}).</span>}
          </>
        )}
      </p>
      <TextAreaField label="Note (optional)" value={note} onChange={(e) => setNote(e.target.value)} error={errors.note} hint="Where the length comes from, which end you measured from" />
      {submit.error != null && Object.keys(errors).length === 0 && <ErrorNotice error={submit.error} unit={unit} />}
      {submit.isSuccess && (
        <Notice tone="ok" title="Sent for review">
          Calibration #{submit.data.id} (VF {submit.data.vf.toFixed(4)}) is in the planners’ queue.
        </Notice>
      )}
      <Button type="submit" disabled={submit.isPending}>
        Send for review
      </Button>
    </form>
  );
}
