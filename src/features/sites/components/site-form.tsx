import { useState, type FormEvent } from 'react';
import type { SiteSummary } from '../../../../shared/schemas/sites';
import { Button } from '../../../components/ui/button';
import { fieldErrors, TextAreaField, TextField } from '../../../components/ui/field';
import { ErrorNotice } from '../../../components/ui/notice';
import { ApiError } from '../../../lib/api-client';
import { useSupervisorChoices } from '../api/list-supervisor-choices';
import { useSaveSite } from '../api/save-site';

export function SiteForm({ site, onSaved }: { site?: SiteSummary; onSaved?: (s: SiteSummary) => void }) {
  const save = useSaveSite();
  const choices = useSupervisorChoices();
  const [form, setForm] = useState({
    name: site?.name ?? '',
    address: site?.address ?? '',
    latitude: site?.latitude?.toString() ?? '',
    longitude: site?.longitude?.toString() ?? '',
    accessNotes: site?.accessNotes ?? '',
    supervisorIds: site?.supervisors.map((s) => s.id) ?? [],
  });
  const errors = fieldErrors(save.error);
  const submit = (e: FormEvent) => {
    e.preventDefault();
    save.mutate(
      {
        id: site?.id,
        ...form,
        latitude: form.latitude === '' ? null : Number(form.latitude),
        longitude: form.longitude === '' ? null : Number(form.longitude),
        // What the form was opened with: a field someone else saved meanwhile is kept unless this form changed it too.
        ...(site && {
          basedOn: {
            name: site.name,
            address: site.address,
            latitude: site.latitude,
            longitude: site.longitude,
            accessNotes: site.accessNotes,
            supervisorIds: site.supervisors.map((u) => u.id),
          },
        }),
      },
      { onSuccess: (s) => onSaved?.(s) },
    );
  };
  return (
    <form className="space-y-3" onSubmit={submit} aria-label={site ? 'Edit site' : 'New site'}>
      <TextField label="Name" value={form.name} error={errors.name} onChange={(e) => setForm({ ...form, name: e.target.value })} required />
      <TextField label="Address" value={form.address} error={errors.address} onChange={(e) => setForm({ ...form, address: e.target.value })} />
      <div className="grid grid-cols-2 gap-3">
        <TextField label="Latitude" inputMode="decimal" value={form.latitude} error={errors.latitude} onChange={(e) => setForm({ ...form, latitude: e.target.value })} />
        <TextField label="Longitude" inputMode="decimal" value={form.longitude} error={errors.longitude} onChange={(e) => setForm({ ...form, longitude: e.target.value })} />
      </div>
      <TextAreaField label="Access notes" hint="Keys, gates, permits, hazards" value={form.accessNotes} error={errors.accessNotes} onChange={(e) => setForm({ ...form, accessNotes: e.target.value })} />
      <fieldset>
        <legend className="text-sm font-semibold text-ink-soft">Supervisors responsible</legend>
        {[...(choices.data ?? []), ...(site?.supervisors.filter((s) => !s.active) ?? [])].map((u) => (
          <label key={u.id} className="flex min-h-11 items-center gap-2">
            <input
              type="checkbox"
              className="size-5"
              checked={form.supervisorIds.includes(u.id)}
              onChange={(e) =>
                setForm({ ...form, supervisorIds: e.target.checked ? [...form.supervisorIds, u.id] : form.supervisorIds.filter((x) => x !== u.id) })
              }
            />
            {u.name} <span className="text-xs text-mist">{u.email}</span>
            {!u.active && <span className="text-xs font-semibold text-warn">no longer a supervisor: untick to take off this site</span>}
          </label>
        ))}
        {errors.supervisorIds && <p className="text-xs font-semibold text-danger">{errors.supervisorIds}</p>}
      </fieldset>
      {save.error && (!Object.keys(errors).length || (save.error instanceof ApiError && save.error.code === 'changed_meanwhile')) && <ErrorNotice error={save.error} />}
      <Button type="submit" disabled={save.isPending}>
        {site ? 'Save site' : 'Add site'}
      </Button>
    </form>
  );
}
