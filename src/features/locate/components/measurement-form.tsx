import { useState, type FormEvent } from 'react';
import { MURRAY_FORMULA_SOURCE, murrayRatioFromArms } from '../../../../shared/locate/bridge';
import { IEC60228_CLASS2_OHM_PER_KM, type ConductorMaterial } from '../../../../shared/locate/conductors';
import {
  MEASUREMENT_KIND_LABELS,
  MEASUREMENT_KINDS,
  type MeasurementInput,
  type MeasurementKind,
  type MeasurementView,
} from '../../../../shared/schemas/measurements';
import { Button } from '../../../components/ui/button';
import { fieldErrors, SelectField, TextAreaField, TextField } from '../../../components/ui/field';
import { ErrorNotice } from '../../../components/ui/notice';
import { fromUnit, lengthForInput, type LengthUnit } from '../../../lib/format';

interface SectionRow {
  length: string;
  material: ConductorMaterial;
  size: string;
}

/** The form as typed: text boxes hold what the technician wrote, in their unit. */
export interface MeasurementFormState {
  kind: MeasurementKind;
  fromEnd: 'A' | 'B';
  instrument: string;
  measuredAt: string;
  note: string;
  /** How the Murray balance is entered: as the ratio Q/(P+Q), or as the two ratio arms P and Q. */
  murrayEntry: 'ratio' | 'arms';
  ratio: string;
  /** Murray ratio arms at balance, Ω: P on the sound side, Q on the faulty side. */
  armP: string;
  armQ: string;
  armRatio: string;
  rheostatOhm: string;
  loopOhm: string;
  sound: 'same' | 'unknown';
  temperatureC: string;
  sections: SectionRow[];
  measuredNf: string;
  compareWith: 'sound' | 'other-end' | 'per-length';
  compareValue: string;
  leadOhm: string;
}

const pad = (n: number) => String(n).padStart(2, '0');
/** A date for a datetime-local box, in the browser's time zone. */
function localInput(d: Date) {
  return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}T${pad(d.getHours())}:${pad(d.getMinutes())}`;
}

export function emptyMeasurementForm(installedLengthM: number, unit: LengthUnit): MeasurementFormState {
  return {
    kind: 'murray',
    fromEnd: 'A',
    instrument: '',
    measuredAt: localInput(new Date()),
    note: '',
    murrayEntry: 'ratio',
    ratio: '',
    armP: '',
    armQ: '',
    armRatio: '1',
    rheostatOhm: '',
    loopOhm: '',
    sound: 'same',
    temperatureC: '',
    sections: [{ length: lengthForInput(installedLengthM, unit), material: 'copper', size: '16' }],
    measuredNf: '',
    compareWith: 'per-length',
    compareValue: '',
    leadOhm: '',
  };
}

type Sections = Array<{ lengthM: number; material: ConductorMaterial; sizeMm2?: number }>;

/** A reading already recorded, back into the form (for a correction). */
export function measurementToForm(m: MeasurementView, installedLengthM: number, unit: LengthUnit): MeasurementFormState {
  const f = emptyMeasurementForm(installedLengthM, unit);
  const r = m.readings as Record<string, unknown>;
  const num = (k: string, scale = 1) => (typeof r[k] === 'number' ? String(Number(((r[k] as number) * scale).toPrecision(10))) : '');
  const sections = (r.faulty ?? r.first) as Sections | undefined;
  const perUnit = unit === 'ft' ? 0.3048 : 1;
  return {
    ...f,
    kind: m.kind,
    fromEnd: r.fromEnd as 'A' | 'B',
    instrument: m.instrument,
    measuredAt: localInput(new Date(m.measuredAt)),
    note: m.note ?? '',
    murrayEntry: typeof r.faultySideArmOhm === 'number' ? 'arms' : 'ratio',
    ratio: num('ratio'),
    armP: num('soundSideArmOhm'),
    armQ: num('faultySideArmOhm'),
    armRatio: num('armRatio') || '1',
    rheostatOhm: num('rheostatOhm'),
    loopOhm: num('loopOhm'),
    sound: r.sound === 'unknown' ? 'unknown' : 'same',
    temperatureC: num('temperatureC'),
    sections: sections?.map((s) => ({ length: lengthForInput(s.lengthM, unit), material: s.material, size: s.sizeMm2 === undefined ? '' : String(s.sizeMm2) })) ?? f.sections,
    measuredNf: num('measuredF', 1e9),
    compareWith: r.soundF !== undefined ? 'sound' : r.otherEndF !== undefined ? 'other-end' : 'per-length',
    compareValue: r.soundF !== undefined ? num('soundF', 1e9) : r.otherEndF !== undefined ? num('otherEndF', 1e9) : num('perMF', 1e12 * perUnit),
    leadOhm: num('leadOhm'),
  };
}

/** A number typed in, or undefined when the box is empty (the server names what is missing). */
const n = (s: string) => (s.trim() === '' ? undefined : Number(s.replace(',', '.')));

/** The readings in SI units, as the API takes them. */
export function formToReadings(f: MeasurementFormState, unit: LengthUnit): Pick<MeasurementInput, 'kind' | 'readings'> {
  const sections = f.sections.map((s) => ({ lengthM: fromUnit(n(s.length) ?? NaN, unit), material: s.material, sizeMm2: n(s.size) }));
  const temperature = n(f.temperatureC) === undefined ? {} : { temperatureC: n(f.temperatureC) };
  switch (f.kind) {
    case 'murray': {
      const balance = f.murrayEntry === 'arms' ? { soundSideArmOhm: n(f.armP), faultySideArmOhm: n(f.armQ) } : { ratio: n(f.ratio) };
      return { kind: 'murray', readings: { fromEnd: f.fromEnd, ...balance, loopOhm: n(f.loopOhm), faulty: sections, sound: f.sound, ...temperature } };
    }
    case 'varley':
      return {
        kind: 'varley',
        readings: { fromEnd: f.fromEnd, armRatio: n(f.armRatio) ?? NaN, rheostatOhm: n(f.rheostatOhm) ?? NaN, loopOhm: n(f.loopOhm), faulty: sections, sound: f.sound, ...temperature },
      };
    case 'capacitance': {
      const v = n(f.compareValue);
      const perUnit = unit === 'ft' ? 0.3048 : 1;
      const compare =
        v === undefined ? {} : f.compareWith === 'sound' ? { soundF: v * 1e-9 } : f.compareWith === 'other-end' ? { otherEndF: v * 1e-9 } : { perMF: (v * 1e-12) / perUnit };
      return { kind: 'capacitance', readings: { fromEnd: f.fromEnd, measuredF: (n(f.measuredNf) ?? NaN) * 1e-9, ...compare } };
    }
    case 'loop-resistance':
      return { kind: 'loop-resistance', readings: { fromEnd: f.fromEnd, loopOhm: n(f.loopOhm) ?? NaN, leadOhm: n(f.leadOhm), first: sections, second: 'same', ...temperature } };
  }
}

const HINTS: Record<MeasurementKind, string> = {
  murray: 'Resistive fault to earth or between conductors, with a sound conductor strapped to the faulty one at the far end.',
  varley: 'As the Murray loop, balanced with a rheostat in the faulty conductor’s arm.',
  capacitance: 'An open (broken) conductor on a pair or a multi-core cable.',
  'loop-resistance': 'A low-resistance short between two conductors.',
};

function SectionsEditor({ f, set, unit, errors }: { f: MeasurementFormState; set: (p: Partial<MeasurementFormState>) => void; unit: LengthUnit; errors: Record<string, string> }) {
  const field = f.kind === 'loop-resistance' ? 'first' : 'faulty';
  const edit = (i: number, p: Partial<SectionRow>) => set({ sections: f.sections.map((s, j) => (j === i ? { ...s, ...p } : s)) });
  return (
    <fieldset className="space-y-2 rounded-md border border-rule p-3">
      <legend className="px-1 text-sm font-semibold text-ink-soft">Conductor, in sections from end A</legend>
      <p className="text-xs text-mist">The sections add up to the installed length. Sections of another size are turned into an equivalent length of the loop.</p>
      {f.sections.map((s, i) => (
        <div key={i} className="grid grid-cols-2 gap-2 sm:grid-cols-[1fr_1fr_1fr_auto]">
          <TextField label={`Section ${i + 1} length (${unit})`} inputMode="decimal" value={s.length} error={errors[`readings.${field}.${i}.lengthM`]} onChange={(e) => edit(i, { length: e.target.value })} />
          <SelectField label="Material" value={s.material} onChange={(e) => edit(i, { material: e.target.value as ConductorMaterial, size: '' })}>
            <option value="copper">Copper</option>
            <option value="aluminium">Aluminium</option>
          </SelectField>
          <SelectField label="Size (mm²)" value={s.size} error={errors[`readings.${field}.${i}.sizeMm2`]} onChange={(e) => edit(i, { size: e.target.value })}>
            <option value="">Choose</option>
            {/* Smallest first: object keys list whole numbers before 1.5 and 2.5, so they are sorted as numbers. */}
            {Object.keys(IEC60228_CLASS2_OHM_PER_KM[s.material])
              .sort((x, y) => Number(x) - Number(y))
              .map((size) => (
              <option key={size} value={size}>
                {size}
              </option>
            ))}
          </SelectField>
          {f.sections.length > 1 && (
            <Button variant="ghost" className="self-end" aria-label={`Remove section ${i + 1}`} onClick={() => set({ sections: f.sections.filter((_, j) => j !== i) })}>
              Remove
            </Button>
          )}
        </div>
      ))}
      <Button variant="secondary" onClick={() => set({ sections: [...f.sections, { length: '', material: f.sections[f.sections.length - 1].material, size: '' }] })}>
        Add a section
      </Button>
    </fieldset>
  );
}

/** The Murray balance as its two ratio arms, with the ratio they give and where the formula is published. */
function MurrayArms({ f, set, errors }: { f: MeasurementFormState; set: (p: Partial<MeasurementFormState>) => void; errors: Record<string, string> }) {
  const p = n(f.armP);
  const q = n(f.armQ);
  const ratio = p !== undefined && q !== undefined && p > 0 && q > 0 ? murrayRatioFromArms(p, q) : null;
  return (
    <>
      <div className="grid gap-3 sm:grid-cols-2">
        <TextField label="Ratio arm P, sound side (Ω)" inputMode="decimal" value={f.armP} error={errors['readings.soundSideArmOhm']} onChange={(e) => set({ armP: e.target.value })} />
        <TextField label="Ratio arm Q, faulty side (Ω)" inputMode="decimal" value={f.armQ} error={errors['readings.faultySideArmOhm']} onChange={(e) => set({ armQ: e.target.value })} />
      </div>
      <p className="text-sm" data-testid="murray-arms-ratio">
        {ratio === null ? 'Give both arms to see the ratio.' : `Ratio Q/(P+Q) = ${ratio.toFixed(4)}: the share of the loop between the test end and the fault.`}
      </p>
      {errors['readings.ratio'] && <p className="text-sm font-semibold text-danger">{errors['readings.ratio']}</p>}
      <p className="text-xs text-mist">
        At balance P/Q = R/X, so the faulty conductor up to the fault is X = Q/(P+Q) of the loop ({MURRAY_FORMULA_SOURCE}).
      </p>
    </>
  );
}

/** The fields of one kind of reading. */
function KindFields({ f, set, unit, errors }: { f: MeasurementFormState; set: (p: Partial<MeasurementFormState>) => void; unit: LengthUnit; errors: Record<string, string> }) {
  const temperature = (
    <TextField label="Conductor temperature (°C)" hint="Leave empty if not measured: 20 °C with a wide uncertainty." inputMode="decimal" value={f.temperatureC} error={errors['readings.temperatureC']} onChange={(e) => set({ temperatureC: e.target.value })} />
  );
  const loopPart = (
    <>
      <SelectField label="Looped (sound) conductor" value={f.sound} onChange={(e) => set({ sound: e.target.value as 'same' | 'unknown' })}>
        <option value="same">Same as the faulty conductor</option>
        <option value="unknown">Unknown (give the loop resistance)</option>
      </SelectField>
      <SectionsEditor f={f} set={set} unit={unit} errors={errors} />
      {temperature}
    </>
  );
  switch (f.kind) {
    case 'murray':
      return (
        <>
          <SelectField label="Balance entered as" value={f.murrayEntry} onChange={(e) => set({ murrayEntry: e.target.value as MeasurementFormState['murrayEntry'] })}>
            <option value="ratio">The ratio Q/(P+Q)</option>
            <option value="arms">The ratio arms P and Q (Ω)</option>
          </SelectField>
          {f.murrayEntry === 'ratio' ? (
            <TextField label="Ratio at balance, Q/(P+Q)" hint="The share of the loop between the test end and the fault, 0 to 1." inputMode="decimal" value={f.ratio} error={errors['readings.ratio']} onChange={(e) => set({ ratio: e.target.value })} />
          ) : (
            <MurrayArms f={f} set={set} errors={errors} />
          )}
          <TextField label="Loop resistance (Ω), if measured" inputMode="decimal" value={f.loopOhm} error={errors['readings.loopOhm']} onChange={(e) => set({ loopOhm: e.target.value })} />
          {loopPart}
        </>
      );
    case 'varley':
      return (
        <>
          <TextField label="Ratio arms a/b" inputMode="decimal" value={f.armRatio} error={errors['readings.armRatio']} onChange={(e) => set({ armRatio: e.target.value })} />
          <TextField label="Rheostat at balance (Ω)" inputMode="decimal" value={f.rheostatOhm} error={errors['readings.rheostatOhm']} onChange={(e) => set({ rheostatOhm: e.target.value })} />
          <TextField label="Loop resistance (Ω), if measured" inputMode="decimal" value={f.loopOhm} error={errors['readings.loopOhm']} onChange={(e) => set({ loopOhm: e.target.value })} />
          {loopPart}
        </>
      );
    case 'capacitance':
      return (
        <>
          <TextField label="Broken conductor, measured (nF)" inputMode="decimal" value={f.measuredNf} error={errors['readings.measuredF']} onChange={(e) => set({ measuredNf: e.target.value })} />
          <SelectField label="Compared with" value={f.compareWith} onChange={(e) => set({ compareWith: e.target.value as MeasurementFormState['compareWith'] })}>
            <option value="per-length">The cable’s capacitance per {unit === 'ft' ? 'foot' : 'metre'}</option>
            <option value="sound">A sound conductor of the same cable, whole length</option>
            <option value="other-end">The same conductor measured from the other end</option>
          </SelectField>
          <TextField
            label={f.compareWith === 'per-length' ? `Capacitance per ${unit === 'ft' ? 'foot (pF/ft)' : 'metre (pF/m)'}` : 'Its capacitance (nF)'}
            inputMode="decimal"
            value={f.compareValue}
            error={errors['readings.perMF'] ?? errors['readings.soundF'] ?? errors['readings.otherEndF']}
            onChange={(e) => set({ compareValue: e.target.value })}
          />
        </>
      );
    case 'loop-resistance':
      return (
        <>
          <TextField label="Loop resistance through the short (Ω)" inputMode="decimal" value={f.loopOhm} error={errors['readings.loopOhm']} onChange={(e) => set({ loopOhm: e.target.value })} />
          <TextField label="Test-lead resistance (Ω)" hint="Leave empty if the meter was zeroed with its leads." inputMode="decimal" value={f.leadOhm} error={errors['readings.leadOhm']} onChange={(e) => set({ leadOhm: e.target.value })} />
          <SectionsEditor f={f} set={set} unit={unit} errors={errors} />
          {temperature}
        </>
      );
  }
}

/**
 * A bridge, capacitance or resistance reading as the technician entered it:
 * which kind, from which end, who measured when and with what.
 * Used for a new reading and for a correction (then with a reason).
 */
export function MeasurementForm({
  initial,
  unit,
  correcting,
  pending,
  error,
  onSubmit,
  onCancel,
}: {
  initial: MeasurementFormState;
  unit: LengthUnit;
  correcting: boolean;
  pending: boolean;
  error: unknown;
  onSubmit: (f: MeasurementFormState, reason: string) => void;
  onCancel?: () => void;
}) {
  const [f, setF] = useState(initial);
  const [reason, setReason] = useState('');
  const set = (p: Partial<MeasurementFormState>) => setF((old) => ({ ...old, ...p }));
  // The location methods name a section "readings.faulty[0]", the request check "readings.faulty.0": one key for both.
  const errors = Object.fromEntries(Object.entries(fieldErrors(error, unit)).map(([k, v]) => [k.replace(/\[(\d+)\]/g, '.$1'), v]));
  const submit = (e: FormEvent) => {
    e.preventDefault();
    onSubmit(f, reason);
  };
  return (
    <form className="space-y-3" onSubmit={submit} aria-label={correcting ? 'Correct the reading' : 'Record a reading'}>
      <div className="grid gap-3 sm:grid-cols-2">
        <SelectField label="Method" value={f.kind} disabled={correcting} onChange={(e) => set({ kind: e.target.value as MeasurementKind })}>
          {MEASUREMENT_KINDS.map((k) => (
            <option key={k} value={k}>
              {MEASUREMENT_KIND_LABELS[k]}
            </option>
          ))}
        </SelectField>
        <SelectField label="Measured from" value={f.fromEnd} error={errors['readings.fromEnd']} onChange={(e) => set({ fromEnd: e.target.value as 'A' | 'B' })}>
          <option value="A">End A</option>
          <option value="B">End B</option>
        </SelectField>
      </div>
      <p className="text-xs text-mist">{HINTS[f.kind]}</p>
      <KindFields f={f} set={set} unit={unit} errors={errors} />
      <div className="grid gap-3 sm:grid-cols-2">
        <TextField label="Instrument" hint="Make, model and serial number." value={f.instrument} error={errors.instrument} onChange={(e) => set({ instrument: e.target.value })} />
        <TextField label="Measured at" type="datetime-local" value={f.measuredAt} error={errors.measuredAt} onChange={(e) => set({ measuredAt: e.target.value })} />
      </div>
      <TextAreaField label="Note (optional)" value={f.note} onChange={(e) => set({ note: e.target.value })} />
      {correcting && <TextField label="Why it is corrected" value={reason} error={errors.reason} onChange={(e) => setReason(e.target.value)} />}
      {error !== null && error !== undefined && <ErrorNotice error={error} unit={unit} />}
      <div className="flex flex-wrap gap-2">
        <Button type="submit" disabled={pending}>
          {correcting ? 'Save the correction' : 'Record the reading'}
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
