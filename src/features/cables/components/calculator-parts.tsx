import type { ReactNode } from 'react';
import {
  assessVf,
  DerivationError,
  derivationReference,
  type FormulaSource,
  type LineGeometryResult,
} from '../../../../shared/cable/derivations';
import { M_PER_FT, SPEED_OF_LIGHT_M_PER_S } from '../../../../shared/cable/propagation';
import type { CableTypeInput } from '../../../../shared/schemas/cables';
import { Button } from '../../../components/ui/button';
import { Card } from '../../../components/ui/card';
import { Notice } from '../../../components/ui/notice';
import type { LengthUnit } from '../../../lib/format';

/** What "Start a cable type with these values" hands to the new-entry form. */
export type CalculatedEntry = Pick<CableTypeInput, 'vf' | 'vfSource' | 'vfReference'> &
  Partial<Pick<CableTypeInput, 'z0Ohm' | 'construction'>>;

/** A typed number; empty or unreadable gives NaN, which the derivations refuse with a message. */
export function num(s: string): number {
  const t = s.trim().replace(',', '.');
  return /^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/.test(t) ? Number(t) : Number.NaN;
}

/** Runs a derivation; a DerivationError becomes { field, message } for the form. */
export function attempt<T>(fn: () => T): { value: T; error: null } | { value: null; error: DerivationError } {
  try {
    return { value: fn(), error: null };
  } catch (e) {
    if (e instanceof DerivationError) return { value: null, error: e };
    throw e;
  }
}

export const sig = (v: number, digits = 4) => (Number.isFinite(v) ? Number(v.toPrecision(digits)).toString() : '—');

/** The inch is a twelfth of the international foot. */
const M_PER_IN = M_PER_FT / 12;

/** Diameters and widths: millimetres, or inches for a planner working in feet. */
export function smallLength(unit: LengthUnit) {
  return {
    label: unit === 'ft' ? 'in' : 'mm',
    toM: (v: number) => (unit === 'ft' ? v * M_PER_IN : v / 1000),
    fromM: (m: number) => (unit === 'ft' ? m / M_PER_IN : m * 1000),
  };
}

export type Row = [ReactNode, ReactNode];

export function Results({ rows, testId }: { rows: Row[]; testId: string }) {
  return (
    <dl
      className="mt-3 grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 rounded-md bg-paper p-3 text-sm tabular"
      aria-live="polite"
      data-testid={testId}
    >
      {rows.map(([k, v], i) => (
        <div key={i} className="contents">
          <dt className="text-ink-soft">{k}</dt>
          <dd className="font-semibold break-words">{v}</dd>
        </div>
      ))}
    </dl>
  );
}

export function Problem({ error }: { error: DerivationError }) {
  return (
    <p className="mt-3 text-sm font-semibold text-danger" role="status">
      {error.message}
    </p>
  );
}

const SUPERSCRIPT: Record<string, string> = {
  '-': '⁻',
  '0': '⁰',
  '1': '¹',
  '2': '²',
  '3': '³',
  '4': '⁴',
  '5': '⁵',
  '6': '⁶',
  '7': '⁷',
  '8': '⁸',
  '9': '⁹',
};

/** 2.4478 × 10⁻¹⁷ */
export function sci(v: number, digits = 5): string {
  if (!Number.isFinite(v)) return '—';
  const [mantissa, exponent] = v.toExponential(digits - 1).split('e');
  return `${mantissa} × 10${[...exponent.replace('+', '')].map((ch) => SUPERSCRIPT[ch] ?? ch).join('')}`;
}

const velocityText = (mPerS: number, unit: LengthUnit) =>
  unit === 'ft' ? `${sig(mPerS / M_PER_FT / 1e6)} ft/µs` : `${sig(mPerS / 1e6)} m/µs`;

/**
 * A line in its L·C form: L, C, v = 1/√(LC) beside c/√(εr·μr), and L·C beside μ·ε.
 * On a uniformly filled line the two velocities agree for any geometry; on a
 * partly filled one the effective εr takes εr's place.
 */
export function lcRows(
  r: LineGeometryResult,
  unit: LengthUnit,
  dielectric: { epsilonR: number; muR: number; effective?: boolean },
): Row[] {
  const perLen = unit === 'ft' ? M_PER_FT : 1;
  const er = dielectric.effective ? 'εeff' : 'εr';
  return [
    ['Z0', `${sig(r.z0Ohm)} Ω`],
    ['L', `${sig(r.lHPerM * perLen * 1e9)} nH/${unit}`],
    ['C', `${sig(r.cFPerM * perLen * 1e12)} pF/${unit}`],
    ['v = 1/√(LC)', velocityText(r.velocityMPerS, unit)],
    [`c/√(${er}·μr)`, velocityText(SPEED_OF_LIGHT_M_PER_S / Math.sqrt(dielectric.epsilonR * dielectric.muR), unit)],
    ['VF = v/c', sig(r.vf)],
    ['Delay', unit === 'ft' ? `${sig(r.delayNsPerM * M_PER_FT)} ns/ft` : `${sig(r.delayNsPerM)} ns/m`],
    ['L·C', `${sci(r.lc * perLen * perLen)} s²/${unit}²`],
    [
      `μ·ε${dielectric.effective ? 'eff' : ''}`,
      <span key="me">
        {sci(r.muEpsilon * perLen * perLen)} s²/{unit}²
        <span className="block text-xs font-normal text-mist">
          {dielectric.effective
            ? 'The geometry cancels out of L·C: only the effective εr of the mixed field is left.'
            : 'The geometry cancels out of L·C: the dielectric alone sets the velocity.'}
        </span>
      </span>,
    ],
  ];
}

/** The formula a card uses, where it is published and the range it holds for. */
export function FormulaNote({ formula }: { formula: FormulaSource }) {
  return (
    <details className="mt-3 rounded-md border border-rule text-sm" data-testid="formula-note">
      <summary className="flex min-h-11 cursor-pointer items-center px-3 py-2 font-semibold text-ink-soft">
        Formula: {formula.name}
      </summary>
      <div className="space-y-1 px-3 pb-3">
        <p className="font-mono text-xs break-words">{formula.formula}</p>
        <p>
          <span className="font-semibold">Source:</span> {formula.source}.
        </p>
        <p>
          <span className="font-semibold">Holds for:</span> {formula.validity}.
        </p>
      </div>
    </details>
  );
}

/**
 * The VF check every card runs on its result: faster than light is refused
 * (and nothing is offered to the library), outside the usual range is shown
 * with a warning.
 */
export function VfCheck({ vf, testId }: { vf: number; testId: string }) {
  const verdict = assessVf(vf);
  if (verdict.level === 'ok') return null;
  return (
    <Notice
      tone={verdict.level === 'refuse' ? 'danger' : 'warn'}
      title={verdict.level === 'refuse' ? 'Not a possible velocity' : 'Check this value'}
      className="mt-3"
    >
      <span data-testid={testId}>{verdict.message}</span>
    </Notice>
  );
}

export interface Offer {
  formula: FormulaSource;
  inputs: string[];
  vf: number;
  z0Ohm?: number;
  construction?: CableTypeInput['construction'];
}

/** A result faster than light is not shown as a result at all; VfCheck says why. */
export const refused = (vf: number) => assessVf(vf).level === 'refuse';

/** "Start a cable type with these values", carrying the derivation (formula, inputs, result, source) into the entry's VF reference. */
export function StartCableType({ offer, onUse }: { offer: Offer; onUse?: (entry: CalculatedEntry) => void }) {
  if (!onUse || assessVf(offer.vf).level === 'refuse') return null;
  const entry: CalculatedEntry = {
    vf: Number(offer.vf.toFixed(4)),
    ...(offer.z0Ohm !== undefined ? { z0Ohm: Number(offer.z0Ohm.toFixed(1)) } : {}),
    ...(offer.construction ? { construction: offer.construction } : {}),
    vfSource: 'calculated',
    vfReference: derivationReference(offer.formula, offer.inputs, { vf: offer.vf, z0Ohm: offer.z0Ohm }),
  };
  return (
    <Button variant="secondary" className="mt-3" onClick={() => onUse(entry)}>
      Start a cable type with these values
    </Button>
  );
}

/** One calculator card: the section's id lets the page's index jump to it. */
export function CalcCard({ id, title, intro, children }: { id: string; title: string; intro: ReactNode; children: ReactNode }) {
  return (
    <div id={id} className="scroll-mt-20">
      <Card title={title} className="h-full">
        <p className="mb-3 text-sm text-ink-soft">{intro}</p>
        {children}
      </Card>
    </div>
  );
}

/** "see below" beside the field a derivation refused, so the planner knows which one to change. */
export const marker = (error: DerivationError | null, ...fields: string[]) =>
  error && fields.includes(error.field) ? 'see below' : undefined;

/** What a derivation gives a card to show: its VF, its result rows and, where it can start a library entry, the offer. */
export interface CardView {
  vf: number;
  rows: Row[];
  offer?: Offer;
}

/**
 * What every card shows under its fields: the derivation's refusal; or its results (held back when
 * faster than light), the VF check, and where the card can start a library entry, the formula it
 * used and the offer. The check's test id is the results' with `-check`.
 */
export function CardOutcome<T>({
  result,
  testId,
  view,
  onUse,
}: {
  result: { value: T; error: null } | { value: null; error: DerivationError };
  testId: string;
  view: (value: T) => CardView;
  onUse?: (entry: CalculatedEntry) => void;
}) {
  if (result.error) return <Problem error={result.error} />;
  const { vf, rows, offer } = view(result.value);
  return (
    <>
      {!refused(vf) && <Results testId={testId} rows={rows} />}
      <VfCheck vf={vf} testId={`${testId}-check`} />
      {offer && (
        <>
          <FormulaNote formula={offer.formula} />
          <StartCableType onUse={onUse} offer={offer} />
        </>
      )}
    </>
  );
}
