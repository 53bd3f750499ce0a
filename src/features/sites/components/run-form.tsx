import { useState, type FormEvent } from 'react';
import type { CableRunView } from '../../../../shared/schemas/sites';
import { Button } from '../../../components/ui/button';
import { fieldErrors, SelectField, TextAreaField, TextField } from '../../../components/ui/field';
import { ErrorNotice } from '../../../components/ui/notice';
import { ApiError } from '../../../lib/api-client';
import { fromUnit, lengthForInput, type LengthUnit } from '../../../lib/format';
import { useCableTypeChoices } from '../api/list-cable-type-choices';
import { useSaveCableRun } from '../api/save-cable-run';

export function RunForm({ siteId, run, unit, onSaved }: { siteId: number; run?: CableRunView; unit: LengthUnit; onSaved?: (r: CableRunView) => void }) {
  const save = useSaveCableRun();
  const types = useCableTypeChoices();
  const loadedLength = run ? lengthForInput(run.installedLengthM, unit) : '';
  const [form, setForm] = useState({
    name: run?.name ?? '',
    cableTypeId: run ? String(run.cableTypeId) : '',
    endALabel: run?.endALabel ?? '',
    endBLabel: run?.endBLabel ?? '',
    installedLength: loadedLength,
    notes: run?.notes ?? '',
  });
  const errors = fieldErrors(save.error, unit);
  const submit = (e: FormEvent) => {
    e.preventDefault();
    save.mutate(
      {
        id: run?.id,
        siteId,
        name: form.name,
        cableTypeId: Number(form.cableTypeId),
        endALabel: form.endALabel,
        endBLabel: form.endBLabel,
        // A length left as shown is sent as stored, not as its rounding in the chosen unit.
        installedLengthM: run && form.installedLength === loadedLength ? run.installedLengthM : fromUnit(Number(form.installedLength), unit),
        notes: form.notes,
        // What the form was opened with: a field someone else saved meanwhile is kept unless this form changed it too.
        ...(run && {
          basedOn: {
            name: run.name,
            cableTypeId: run.cableTypeId,
            endALabel: run.endALabel,
            endBLabel: run.endBLabel,
            installedLengthM: run.installedLengthM,
            notes: run.notes,
          },
        }),
      },
      { onSuccess: (r) => onSaved?.(r) },
    );
  };
  return (
    <form className="space-y-3" onSubmit={submit} aria-label={run ? 'Edit cable run' : 'New cable run'}>
      <TextField label="Name" value={form.name} error={errors.name} onChange={(e) => setForm({ ...form, name: e.target.value })} required />
      <SelectField label="Cable type" value={form.cableTypeId} error={errors.cableTypeId} onChange={(e) => setForm({ ...form, cableTypeId: e.target.value })} required>
        <option value="">Choose from the library…</option>
        {types.data?.map((t) => (
          <option key={t.id} value={t.id}>
            {t.name} (VF {t.vf})
          </option>
        ))}
      </SelectField>
      <div className="grid gap-3 sm:grid-cols-2">
        <TextField label="End A is at" value={form.endALabel} error={errors.endALabel} onChange={(e) => setForm({ ...form, endALabel: e.target.value })} required />
        <TextField label="End B is at" value={form.endBLabel} error={errors.endBLabel} onChange={(e) => setForm({ ...form, endBLabel: e.target.value })} required />
      </div>
      <TextField
        label={`Installed length, cable incl. slack (${unit})`}
        inputMode="decimal"
        value={form.installedLength}
        error={errors.installedLengthM}
        onChange={(e) => setForm({ ...form, installedLength: e.target.value })}
        required
      />
      <TextAreaField label="Notes" value={form.notes} onChange={(e) => setForm({ ...form, notes: e.target.value })} />
      {save.error && (!Object.keys(errors).length || (save.error instanceof ApiError && save.error.code === 'changed_meanwhile')) && <ErrorNotice error={save.error} unit={unit} />}
      <Button type="submit" disabled={save.isPending}>
        {run ? 'Save cable run' : 'Add cable run'}
      </Button>
    </form>
  );
}
