import { useState } from 'react';
import { MARKER_KINDS, type CableRunView, type MarkerKind } from '../../../../shared/schemas/sites';
import { Button } from '../../../components/ui/button';
import { fieldErrors } from '../../../components/ui/field';
import { ErrorNotice, Notice } from '../../../components/ui/notice';
import { fromUnit, lengthForInput, markerKindTitle, type LengthUnit } from '../../../lib/format';
import { useSaveMarkers } from '../api/save-markers';

interface Row {
  label: string;
  kind: MarkerKind;
  chainage: string;
  slack: string;
  notes: string;
  latitude: string;
  longitude: string;
}

/**
 * A coordinate as typed: empty is none; anything that is not a plain decimal
 * number goes to the server as typed, which says what is wrong with it.
 */
function degrees(text: string): number | null {
  const t = text.trim();
  if (t === '') return null;
  const v = Number(t);
  return (Number.isFinite(v) ? v : t) as number;
}

// The label above is small and grey; the value a person saved is ink, never placeholder grey.
const CELL = 'mt-0.5 min-h-11 w-full rounded border border-rule bg-white px-2 text-base text-ink';

/**
 * Edit a run's route markers as one list: chainage along the route from end
 * A, slack coiled there, and where the marker is (WGS 84 degrees, optional),
 * from which a best location is placed on the map.
 */
export function MarkerEditor({ run, unit }: { run: CableRunView; unit: LengthUnit }) {
  const toRow = (m: CableRunView['markers'][number]): Row => ({
    label: m.label,
    kind: m.kind,
    chainage: lengthForInput(m.chainageM, unit),
    slack: lengthForInput(m.slackM, unit),
    notes: m.notes ?? '',
    latitude: m.latitude === null ? '' : String(m.latitude),
    longitude: m.longitude === null ? '' : String(m.longitude),
  });
  const [rows, setRows] = useState<Row[]>(run.markers.map(toRow));
  // The list the rows were loaded from: sent with the save, so a list someone else saved meanwhile is not replaced unseen.
  const [basis, setBasis] = useState(run.markers);
  const save = useSaveMarkers();
  const errors = fieldErrors(save.error, unit);
  const edit = (i: number, patch: Partial<Row>) => setRows(rows.map((r, j) => (j === i ? { ...r, ...patch } : r)));
  // The editor stays mounted across a save (so its "saved" notice shows); its rows take the markers as stored.
  const submit = () =>
    save.mutate(
      {
        runId: run.id,
        markers: rows.map((r) => ({
          label: r.label,
          kind: r.kind,
          chainageM: fromUnit(Number(r.chainage), unit),
          slackM: fromUnit(Number(r.slack || 0), unit),
          notes: r.notes,
          latitude: degrees(r.latitude),
          longitude: degrees(r.longitude),
        })),
        basedOn: { markers: basis },
      },
      {
        onSuccess: (saved) => {
          setRows(saved.markers.map(toRow));
          setBasis(saved.markers);
        },
      },
    );
  return (
    <div className="space-y-3">
      <div className="space-y-3">
        {rows.map((r, i) => (
          <fieldset key={i} className="grid grid-cols-2 gap-2 rounded-md border border-rule p-2 sm:grid-cols-[1fr_1fr_1fr_1fr_auto]">
            <legend className="sr-only">Marker {i + 1}</legend>
            <label className="text-xs text-mist">
              Label
              <input className={CELL} value={r.label} aria-invalid={!!errors[`markers.${i}.label`]} onChange={(e) => edit(i, { label: e.target.value })} />
            </label>
            <label className="text-xs text-mist">
              Kind
              <select className={CELL} value={r.kind} onChange={(e) => edit(i, { kind: e.target.value as MarkerKind })}>
                {MARKER_KINDS.map((k) => (
                  <option key={k} value={k}>
                    {markerKindTitle(k)}
                  </option>
                ))}
              </select>
            </label>
            <label className="text-xs text-mist">
              Chainage ({unit})
              <input className={CELL} inputMode="decimal" value={r.chainage} aria-invalid={!!errors[`markers.${i}.chainageM`]} onChange={(e) => edit(i, { chainage: e.target.value })} />
            </label>
            <label className="text-xs text-mist">
              Slack ({unit})
              <input className={CELL} inputMode="decimal" value={r.slack} aria-invalid={!!errors[`markers.${i}.slackM`]} onChange={(e) => edit(i, { slack: e.target.value })} />
            </label>
            <Button variant="ghost" className="self-end" aria-label={`Remove marker ${r.label || i + 1}`} onClick={() => setRows(rows.filter((_, j) => j !== i))}>
              Remove
            </Button>
            <div className="col-span-full grid grid-cols-2 gap-2 sm:grid-cols-4">
              <label className="text-xs text-mist">
                Latitude (°, optional)
                <input className={CELL} inputMode="decimal" placeholder="e.g. 52.204310" value={r.latitude} aria-invalid={!!errors[`markers.${i}.latitude`]} onChange={(e) => edit(i, { latitude: e.target.value })} />
              </label>
              <label className="text-xs text-mist">
                Longitude (°, optional)
                <input className={CELL} inputMode="decimal" placeholder="e.g. -1.512870" value={r.longitude} aria-invalid={!!errors[`markers.${i}.longitude`]} onChange={(e) => edit(i, { longitude: e.target.value })} />
              </label>
            </div>
            {Object.entries(errors)
              .filter(([k]) => k.startsWith(`markers.${i}.`))
              .map(([k, m]) => (
                <p key={k} className="col-span-full text-xs font-semibold text-danger">
                  {m}
                </p>
              ))}
          </fieldset>
        ))}
      </div>
      <div className="flex flex-wrap gap-2">
        <Button variant="secondary" onClick={() => setRows([...rows, { label: '', kind: 'manhole', chainage: '', slack: '0', notes: '', latitude: '', longitude: '' }])}>
          Add marker
        </Button>
        <Button onClick={submit} disabled={save.isPending}>
          Save markers
        </Button>
      </div>
      {save.isSuccess && <Notice tone="ok">Markers saved. New findings use them; earlier findings keep the position they were given.</Notice>}
      {save.error && <ErrorNotice error={save.error} unit={unit} />}
    </div>
  );
}
