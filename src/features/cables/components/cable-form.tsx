import { useState, type FormEvent } from 'react';
import {
  CableTypeInputSchema,
  CONSTRUCTIONS,
  VF_SOURCES,
  type CableTypeInput,
  type CableTypeView,
  type Construction,
  type VfSource,
} from '../../../../shared/schemas/cables';
import { Button } from '../../../components/ui/button';
import { fieldErrors, SelectField, TextAreaField, TextField } from '../../../components/ui/field';
import { ErrorNotice } from '../../../components/ui/notice';
import type { LengthUnit } from '../../../lib/format';
import { constructionLabel, formatDelay, vfSourceLabel } from '../cable-format';
import { CableLossFields, lossStateFrom, lossValuesFrom, typedNumber as num, type LossFormState } from './cable-loss-fields';

/** What the planner types: strings, tolerance in percent, attenuation per 100 m or 100 ft. */
export interface CableFormState {
  name: string;
  construction: Construction;
  dielectric: string;
  z0Ohm: string;
  vf: string;
  vfTolerancePercent: string;
  vfSource: VfSource;
  vfReference: string;
  notes: string;
  loss: LossFormState;
}

/** The one-point pair repeats the list's lowest point; the form edits the list only. */
type FormFields = Exclude<keyof CableTypeInput, 'attenuationDbPer100m' | 'attenuationFreqMhz'>;

const trimNumber = (n: number) => String(Number(n.toPrecision(10)));

export function stateFromCable(c: Partial<CableTypeInput> | undefined, unit: LengthUnit): CableFormState {
  return {
    name: c?.name ?? '',
    construction: c?.construction ?? 'coax',
    dielectric: c?.dielectric ?? '',
    z0Ohm: c?.z0Ohm !== undefined ? trimNumber(c.z0Ohm) : '',
    vf: c?.vf !== undefined ? trimNumber(c.vf) : '',
    vfTolerancePercent: c?.vfTolerance !== undefined ? trimNumber(c.vfTolerance * 100) : '2',
    vfSource: c?.vfSource ?? 'datasheet',
    vfReference: c?.vfReference ?? '',
    notes: c?.notes ?? '',
    loss: lossStateFrom(c ?? {}, unit),
  };
}

export function valuesFromState(s: CableFormState, unit: LengthUnit): Record<FormFields, unknown> {
  const tol = num(s.vfTolerancePercent);
  return {
    name: s.name,
    construction: s.construction,
    dielectric: s.dielectric,
    z0Ohm: num(s.z0Ohm) ?? undefined,
    vf: num(s.vf) ?? undefined,
    vfTolerance: tol === null ? undefined : tol / 100,
    vfSource: s.vfSource,
    vfReference: s.vfReference,
    notes: s.notes.trim() === '' ? null : s.notes,
    ...lossValuesFrom(s.loss, unit),
  };
}

/** Form field names differ from the stored ones for the converted input. */
const FORM_FIELD: Record<string, keyof CableFormState> = { vfTolerance: 'vfTolerancePercent' };
const toFormErrors = (errors: Record<string, string>) =>
  Object.fromEntries(Object.entries(errors).map(([k, v]) => [FORM_FIELD[k] ?? k, k === 'vfTolerance' ? v.replace(/0\.5 \(±50 %\)/, '50 %') : v]));

export interface CableFormProps {
  unit: LengthUnit;
  /** The stored entry when editing. */
  cable?: CableTypeView;
  /** Values to start a new entry with (from the calculator). */
  prefill?: Partial<CableTypeInput>;
  pending: boolean;
  error: unknown;
  submitLabel: string;
  onSubmit: (values: CableTypeInput, reason: string) => void;
  onCancel?: () => void;
}

/**
 * One library entry's fields. When editing, only changed fields are sent and a
 * reason is required (the history keeps it). Checked with the same schema as
 * the server before anything is sent.
 */
export function CableForm({ unit, cable, prefill, pending, error, submitLabel, onSubmit, onCancel }: CableFormProps) {
  const [state, setState] = useState<CableFormState>(() => stateFromCable(cable ?? prefill, unit));
  const [reason, setReason] = useState('');
  const [localErrors, setLocalErrors] = useState<Record<string, string>>({});
  const editing = !!cable;
  const serverErrors = toFormErrors(fieldErrors(error));
  const errors = { ...serverErrors, ...localErrors };
  const set = <K extends keyof CableFormState>(k: K, v: CableFormState[K]) => setState((s) => ({ ...s, [k]: v }));

  const vfNumber = num(state.vf);
  const submit = (e: FormEvent) => {
    e.preventDefault();
    const parsed = CableTypeInputSchema.safeParse(valuesFromState(state, unit));
    const next: Record<string, string> = {};
    if (!parsed.success) for (const i of parsed.error.issues) next[i.path.join('.') || '(body)'] ??= i.message;
    if (editing && reason.trim().length < 3) next.reason = 'is required: say why (at least 3 characters)';
    setLocalErrors(toFormErrors(next));
    if (Object.keys(next).length || !parsed.success) return;
    onSubmit(parsed.data, reason.trim());
  };

  return (
    <form onSubmit={submit} className="space-y-4" noValidate aria-label={editing ? `Edit ${cable.name}` : 'New cable type'}>
      <div className="grid gap-3 sm:grid-cols-2">
        <TextField label="Name" value={state.name} onChange={(e) => set('name', e.target.value)} error={errors.name} required />
        <SelectField label="Construction" value={state.construction} onChange={(e) => set('construction', e.target.value as Construction)} error={errors.construction}>
          {CONSTRUCTIONS.map((c) => (
            <option key={c} value={c}>
              {constructionLabel(c)}
            </option>
          ))}
        </SelectField>
        <TextField label="Dielectric" value={state.dielectric} onChange={(e) => set('dielectric', e.target.value)} error={errors.dielectric} hint="e.g. solid polyethylene, XLPE" />
        <TextField label="Impedance Z0 (Ω)" inputMode="decimal" value={state.z0Ohm} onChange={(e) => set('z0Ohm', e.target.value)} error={errors.z0Ohm}
          hint="The datasheet's characteristic impedance: typically 50 or 75 Ω for coax, about 100 Ω for telephone and data pairs"
        />
        <TextField
          label="Velocity factor"
          inputMode="decimal"
          value={state.vf}
          onChange={(e) => set('vf', e.target.value)}
          error={errors.vf}
          hint={vfNumber && vfNumber > 0 && vfNumber <= 1 ? `A fraction of c, e.g. 0.66 · delay ${formatDelay(vfNumber, unit)}` : 'A fraction of c, e.g. 0.66'}
        />
        <TextField
          label="VF tolerance (± %)"
          inputMode="decimal"
          value={state.vfTolerancePercent}
          onChange={(e) => set('vfTolerancePercent', e.target.value)}
          error={errors.vfTolerancePercent}
          hint="How far the true VF may be from this value"
        />
        <SelectField label="Source of the VF" value={state.vfSource} onChange={(e) => set('vfSource', e.target.value as VfSource)} error={errors.vfSource}>
          {VF_SOURCES.map((s) => (
            <option key={s} value={s}>
              {vfSourceLabel(s)}
            </option>
          ))}
        </SelectField>
      </div>
      <TextAreaField
        label="Reference for the VF"
        value={state.vfReference}
        onChange={(e) => set('vfReference', e.target.value)}
        error={errors.vfReference}
        hint="Which datasheet, handbook table, calculation or calibration it comes from"
      />
      <TextAreaField label="Notes (optional)" value={state.notes} onChange={(e) => set('notes', e.target.value)} error={errors.notes} />
      <CableLossFields unit={unit} state={state.loss} onChange={(loss) => set('loss', loss)} errors={errors} />
      {editing && (
        <TextField
          label="Reason for the change"
          value={reason}
          onChange={(e) => setReason(e.target.value)}
          error={errors.reason}
          hint="Kept in the history with your name and the time"
          required
        />
      )}
      {error != null && Object.keys(serverErrors).length === 0 && <ErrorNotice error={error} />}
      {errors['(body)'] && <p className="text-sm font-semibold text-danger">{errors['(body)']}</p>}
      <div className="flex flex-wrap gap-2">
        <Button type="submit" disabled={pending}>
          {submitLabel}
        </Button>
        {onCancel && (
          <Button variant="secondary" onClick={onCancel}>
            Cancel
          </Button>
        )}
      </div>
    </form>
  );
}

/** Equal, numbers within rounding (a unit conversion there and back), lists and records field by field. */
function sameValue(a: unknown, b: unknown): boolean {
  if (typeof a === 'number' && typeof b === 'number') return Math.abs(a - b) <= 1e-9 * Math.max(1, Math.abs(a));
  if (Array.isArray(a) && Array.isArray(b)) return a.length === b.length && a.every((x, i) => sameValue(x, b[i]));
  if (a && b && typeof a === 'object' && typeof b === 'object') {
    const ka = Object.keys(a);
    return ka.length === Object.keys(b).length && ka.every((k) => sameValue((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k]));
  }
  return a === b;
}

/** The fields of `next` that differ from the stored entry: what an edit sends (the list, never the pair that repeats it). */
export function changedFields(cable: CableTypeView, next: CableTypeInput): Partial<CableTypeInput> {
  const out: Partial<CableTypeInput> = {};
  for (const k of Object.keys(next) as Array<keyof CableTypeInput>) {
    if (k === 'attenuationDbPer100m' || k === 'attenuationFreqMhz') continue;
    const a = cable[k];
    const b = next[k];
    const same = sameValue(a, b);
    if (!same) (out as Record<string, unknown>)[k] = b;
  }
  return out;
}
