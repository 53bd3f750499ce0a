import type { CalibrationStats } from '../../../../shared/cable/calibration';
import { proposeVf, SINGLE_CALIBRATION_TOLERANCE, TOLERANCE_FLOOR } from '../../../../shared/cable/calibration-proposal';
import type { CalibrationView } from '../../../../shared/schemas/cables';
import { TextField } from '../../../components/ui/field';
import { formatLength, type LengthUnit } from '../../../lib/format';

export interface ProposalValues {
  vf: string;
  /** ± percent, as typed. */
  tolerancePct: string;
}

const pct = (f: number) => `${(f * 100).toFixed(1)} %`;

/** The example error in a calibration's length that the single-calibration caution works through. */
export const EXAMPLE_LENGTH_ERROR_M = 0.5;

/** The library values the form starts from: the proposal's. */
export function proposalDefaults(c: CalibrationView, acceptedVfs: number[], libraryVfTolerance: number): ProposalValues {
  const p = proposeVf(acceptedVfs, c.vf, libraryVfTolerance);
  return { vf: p.vf.toFixed(4), tolerancePct: (p.vfTolerance * 100).toFixed(1) };
}

/** The typed values as the API takes them, or null while either is not a number in range. */
export function proposalInput(v: ProposalValues): { vf: number; vfTolerance: number } | null {
  const vf = Number(v.vf.trim().replace(',', '.'));
  const tol = Number(v.tolerancePct.trim().replace(',', '.')) / 100;
  if (!v.vf.trim() || !v.tolerancePct.trim() || !(vf > 0 && vf <= 1) || !(tol >= 0 && tol <= 0.5)) return null;
  return { vf, vfTolerance: Math.round(tol * 1e6) / 1e6 };
}

/**
 * Before accepting: how many calibrations of this cable type were accepted,
 * their mean and spread, and the VF and tolerance proposed for the library
 * with this one added, in fields the planner may change before confirming.
 */
export function CalibrationProposal({
  calibration,
  accepted,
  acceptedVfs,
  libraryVf,
  libraryVfTolerance,
  values,
  onValues,
  errors,
  unit,
}: {
  calibration: CalibrationView;
  accepted: CalibrationStats;
  acceptedVfs: number[];
  libraryVf: number;
  libraryVfTolerance: number;
  values: ProposalValues;
  onValues: (v: ProposalValues) => void;
  errors: Record<string, string>;
  unit: LengthUnit;
}) {
  const p = proposeVf(acceptedVfs, calibration.vf, libraryVfTolerance);
  const rule =
    p.rule === 'single'
      ? `one calibration shows no spread yet: ±${pct(SINGLE_CALIBRATION_TOLERANCE)} (common practice for a single known-length calibration), or the present ±${pct(libraryVfTolerance)} if tighter, never under ${pct(TOLERANCE_FLOOR)}`
      : p.rule === 'floor'
        ? `2·s/VF = ${pct((2 * p.stdDev!) / p.mean)} is under the ${pct(TOLERANCE_FLOOR)} floor (common practice: a known-length calibration is rarely better), so ${pct(TOLERANCE_FLOOR)}`
        : `2·s/VF = 2 × ${p.stdDev!.toFixed(4)} / ${p.mean.toFixed(4)}: two standard deviations, about 95 % of cables of this type`;
  return (
    <div className="space-y-2 rounded-md border border-rule bg-paper p-3 text-sm" data-testid={`proposal-${calibration.id}`}>
      <p className="tabular" data-testid="accepted-stats">
        <span className="font-semibold">Accepted so far for {calibration.cableType.name}:</span>{' '}
        {accepted.count === 0
          ? 'none.'
          : `n = ${accepted.count} · mean VF ${accepted.mean!.toFixed(4)} · spread (s.d.) ${accepted.stdDev === null ? '— (one value)' : accepted.stdDev.toFixed(4)}.`}
      </p>
      <p className="tabular">
        <span className="font-semibold">Proposed on accepting:</span> VF {p.vf.toFixed(4)}, the mean of {p.count === 1 ? 'this calibration alone' : `the ${p.count} accepted with this one`} (library
        now {libraryVf.toFixed(4)} ± {pct(libraryVfTolerance)}); tolerance ±{pct(p.vfTolerance)}: {rule}.
      </p>
      {p.count === 1 && (
        // VF = 2L / (c·t), so an error in L moves the VF by the same share of it.
        <p className="rounded-md border-l-4 border-warn bg-warn-light px-3 py-2 text-ink" role="note" data-testid="single-calibration-caution">
          <span className="font-semibold">Caution: this rests on a single calibration.</span>{' '}
          {`One cable shows nothing of the spread between cables of this type. On a short run a small error in the ${
            calibration.source === 'repair-closeout' ? 'found position' : 'known length'
          } is a large share of the length: as an example, ±${formatLength(EXAMPLE_LENGTH_ERROR_M, unit)} on this ${formatLength(calibration.knownLengthM, unit)} is ±${pct(
            EXAMPLE_LENGTH_ERROR_M / calibration.knownLengthM,
          )}, and the VF it gives moves by the same share. You decide what to store.`}
        </p>
      )}
      <div className="grid gap-2 sm:grid-cols-2">
        <TextField label="VF to store" inputMode="decimal" value={values.vf} error={errors.vf} onChange={(e) => onValues({ ...values, vf: e.target.value })} />
        <TextField label="Tolerance (± %)" inputMode="decimal" value={values.tolerancePct} error={errors.vfTolerance} onChange={(e) => onValues({ ...values, tolerancePct: e.target.value })} />
      </div>
    </div>
  );
}
