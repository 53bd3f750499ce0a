import { M_PER_FT } from '../../../../shared/cable/propagation';
import {
  LINE_CONSTANT_FIELDS,
  LINE_CONSTANT_LABELS,
  MAX_ATTENUATION_POINTS,
  MAX_PULSE_VFS,
  type AttenuationPoint,
  type LineConstantField,
  type PulseVf,
} from '../../../../shared/schemas/cables';
import { Button } from '../../../components/ui/button';
import { TextAreaField, TextField } from '../../../components/ui/field';
import type { LengthUnit } from '../../../lib/format';

/** What the planner types for the loss: strings, attenuation per 100 m or 100 ft. */
export interface LossFormState {
  points: Array<{ frequencyMhz: string; attenuation: string }>;
  lossSource: string;
  constants: Record<LineConstantField, string>;
  pulseVfs: Array<{ pulseWidthNs: string; vf: string; source: string }>;
}

const trimNumber = (n: number) => String(Number(n.toPrecision(10)));

export function lossStateFrom(
  c: { attenuation?: AttenuationPoint[]; lossSource?: string | null; pulseVfs?: PulseVf[] } & Partial<
    Record<LineConstantField, number | null>
  >,
  unit: LengthUnit,
): LossFormState {
  return {
    points: (c.attenuation ?? []).map((p) => ({
      frequencyMhz: trimNumber(p.frequencyMhz),
      attenuation: trimNumber(unit === 'ft' ? p.dbPer100m * M_PER_FT : p.dbPer100m),
    })),
    lossSource: c.lossSource ?? '',
    constants: Object.fromEntries(LINE_CONSTANT_FIELDS.map((f) => [f, c[f] != null ? String(c[f]) : ''])) as Record<
      LineConstantField,
      string
    >,
    pulseVfs: (c.pulseVfs ?? []).map((p) => ({
      pulseWidthNs: trimNumber(p.pulseWidthNs),
      vf: trimNumber(p.vf),
      source: p.source,
    })),
  };
}

/** A typed number, or NaN; a comma is taken as the decimal mark. Empty gives null. */
export function typedNumber(s: string): number | null {
  const t = s.trim().replace(',', '.');
  if (t === '') return null;
  return /^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/.test(t) ? Number(t) : NaN;
}

/** The loss fields as the API takes them (SI, per metre). Rows left wholly empty are dropped. */
export function lossValuesFrom(s: LossFormState, unit: LengthUnit) {
  const perM = (v: number | null) => (v === null ? undefined : unit === 'ft' ? v / M_PER_FT : v);
  return {
    attenuation: s.points
      .filter((p) => p.frequencyMhz.trim() !== '' || p.attenuation.trim() !== '')
      .map((p) => ({ frequencyMhz: typedNumber(p.frequencyMhz) ?? undefined, dbPer100m: perM(typedNumber(p.attenuation)) })),
    lossSource: s.lossSource.trim() === '' ? null : s.lossSource,
    ...(Object.fromEntries(LINE_CONSTANT_FIELDS.map((f) => [f, typedNumber(s.constants[f])])) as Record<
      LineConstantField,
      number | null
    >),
    pulseVfs: s.pulseVfs
      .filter((p) => p.pulseWidthNs.trim() !== '' || p.vf.trim() !== '' || p.source.trim() !== '')
      .map((p) => ({
        pulseWidthNs: typedNumber(p.pulseWidthNs) ?? undefined,
        vf: typedNumber(p.vf) ?? undefined,
        source: p.source,
      })),
  };
}

/** "attenuation.1.dbPer100m" → "Point 2: …"; the list's own message stays as it is. */
function listErrors(errors: Record<string, string>, list: string, noun: string, names: Record<string, string>): string[] {
  return Object.entries(errors)
    .filter(([k]) => k === list || k.startsWith(`${list}.`))
    .map(([k, v]) => {
      const [, row, field] = k.split('.');
      if (row === undefined) return v;
      return `${noun} ${Number(row) + 1}${field ? `, ${names[field] ?? field}` : ''}: ${v}`;
    });
}

interface Props {
  unit: LengthUnit;
  state: LossFormState;
  onChange: (next: LossFormState) => void;
  errors: Record<string, string>;
}

/** Attenuation points, the line constants and the pulse-width VFs of one library entry. */
export function CableLossFields({ unit, state, onChange, errors }: Props) {
  const set = (patch: Partial<LossFormState>) => onChange({ ...state, ...patch });
  const pointErrors = listErrors(errors, 'attenuation', 'Point', { frequencyMhz: 'frequency', dbPer100m: 'attenuation' });
  const pulseErrors = listErrors(errors, 'pulseVfs', 'Pulse width', { pulseWidthNs: 'width', vf: 'VF', source: 'source' });
  return (
    <fieldset className="space-y-3 rounded-md border border-rule p-3">
      <legend className="px-1 text-sm font-semibold">Loss and pulse-width VFs (optional)</legend>
      <p className="text-xs text-mist">
        The trace analysis uses the loss to place far reflections and to correct their reflection coefficient. Give attenuation at
        the frequencies a datasheet lists, or the line constants, and say where the figures come from.
      </p>

      <div className="space-y-2" role="group" aria-label="Attenuation points">
        {state.points.map((p, i) => (
          <div key={i} className="grid grid-cols-[1fr_1fr_auto] items-end gap-2">
            <TextField
              label={`Frequency ${i + 1} (MHz)`}
              inputMode="decimal"
              value={p.frequencyMhz}
              onChange={(e) =>
                set({ points: state.points.map((q, k) => (k === i ? { ...q, frequencyMhz: e.target.value } : q)) })
              }
            />
            <TextField
              label={`Attenuation ${i + 1} (dB/100 ${unit})`}
              inputMode="decimal"
              value={p.attenuation}
              onChange={(e) => set({ points: state.points.map((q, k) => (k === i ? { ...q, attenuation: e.target.value } : q)) })}
            />
            <Button
              variant="ghost"
              aria-label={`Remove point ${i + 1}`}
              onClick={() => set({ points: state.points.filter((_q, k) => k !== i) })}
            >
              Remove
            </Button>
          </div>
        ))}
        {pointErrors.map((m) => (
          <p key={m} className="text-xs font-semibold text-danger">
            {m}
          </p>
        ))}
        <Button
          variant="secondary"
          disabled={state.points.length >= MAX_ATTENUATION_POINTS}
          onClick={() => set({ points: [...state.points, { frequencyMhz: '', attenuation: '' }] })}
        >
          Add an attenuation point
        </Button>
      </div>

      <details
        className="rounded-md bg-paper p-2"
        open={LINE_CONSTANT_FIELDS.some((f) => state.constants[f] !== '' || errors[f])}
      >
        <summary className="min-h-11 cursor-pointer py-2 text-sm font-semibold">Line constants per metre</summary>
        <p className="text-xs text-mist">
          R(f) = R + kₛ·√f and G(f) = G + 2πf·C·tanδ. SI units per metre; write powers of ten as e.g. 5.05e-7.
        </p>
        <div className="mt-2 grid gap-3 sm:grid-cols-2">
          {LINE_CONSTANT_FIELDS.map((f) => (
            <TextField
              key={f}
              label={`${LINE_CONSTANT_LABELS[f].label}${LINE_CONSTANT_LABELS[f].unit ? ` (${LINE_CONSTANT_LABELS[f].unit})` : ''}`}
              inputMode="decimal"
              value={state.constants[f]}
              onChange={(e) => set({ constants: { ...state.constants, [f]: e.target.value } })}
              error={errors[f]}
            />
          ))}
        </div>
      </details>

      <TextAreaField
        label="Source of the loss figures"
        value={state.lossSource}
        onChange={(e) => set({ lossSource: e.target.value })}
        error={errors.lossSource}
        hint="Which datasheet, measurement or calculation; say “typical” where it is not the installed cable's own"
      />

      <div className="space-y-2" role="group" aria-label="VF per pulse width">
        <p className="text-sm font-semibold text-ink-soft">VF measured at a pulse width</p>
        <p className="text-xs text-mist">
          On pairs the VF read with long pulses is lower. A trace taken with one of these widths uses its VF.
        </p>
        {state.pulseVfs.map((p, i) => (
          <div key={i} className="grid grid-cols-2 items-end gap-2 sm:grid-cols-[1fr_1fr_2fr_auto]">
            <TextField
              label={`Pulse width ${i + 1} (ns)`}
              inputMode="decimal"
              value={p.pulseWidthNs}
              onChange={(e) =>
                set({ pulseVfs: state.pulseVfs.map((q, k) => (k === i ? { ...q, pulseWidthNs: e.target.value } : q)) })
              }
            />
            <TextField
              label={`VF ${i + 1}`}
              inputMode="decimal"
              value={p.vf}
              onChange={(e) => set({ pulseVfs: state.pulseVfs.map((q, k) => (k === i ? { ...q, vf: e.target.value } : q)) })}
            />
            <TextField
              label={`Measured how ${i + 1}`}
              value={p.source}
              onChange={(e) => set({ pulseVfs: state.pulseVfs.map((q, k) => (k === i ? { ...q, source: e.target.value } : q)) })}
            />
            <Button
              variant="ghost"
              aria-label={`Remove pulse width ${i + 1}`}
              onClick={() => set({ pulseVfs: state.pulseVfs.filter((_q, k) => k !== i) })}
            >
              Remove
            </Button>
          </div>
        ))}
        {pulseErrors.map((m) => (
          <p key={m} className="text-xs font-semibold text-danger">
            {m}
          </p>
        ))}
        <Button
          variant="secondary"
          disabled={state.pulseVfs.length >= MAX_PULSE_VFS}
          onClick={() => set({ pulseVfs: [...state.pulseVfs, { pulseWidthNs: '', vf: '', source: '' }] })}
        >
          Add a pulse-width VF
        </Button>
      </div>
    </fieldset>
  );
}
