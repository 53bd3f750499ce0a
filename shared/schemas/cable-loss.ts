import { z } from 'zod';
import { required } from './input';
import { SPEED_OF_LIGHT_M_PER_S } from '../cable/propagation';

/**
 * A cable type's loss and dispersion, as the library keeps them:
 * - attenuation in dB per 100 m at a few stated frequencies (a datasheet's table);
 * - optionally the per-metre line constants R, L, G, C with a skin-effect and a
 *   dielectric term: R(f) = R_dc + k_s·√f and G(f) = G_dc + 2πf·C·tanδ
 *   (the usual two-term loss model, e.g. D. M. Pozar, "Microwave Engineering",
 *   4th ed., §2.7 and §1.7);
 * - a velocity factor per pulse width where a planner has measured one, because
 *   on pairs the effective VF falls for long pulses (dispersion).
 * Every figure carries its source.
 */

const num = (what = 'must be a number') => z.number({ error: required(what) }).finite({ error: what });

export const MAX_ATTENUATION_POINTS = 12;
export const MAX_PULSE_VFS = 12;

export const AttenuationPointSchema = z.object({
  frequencyMhz: num('is required: a frequency in MHz')
    .gt(0, 'must be greater than 0 MHz')
    .max(100_000, 'must be at most 100000 MHz'),
  dbPer100m: num('is required: dB per 100 m').min(0, 'must not be negative').max(1000, 'must be at most 1000 dB/100 m'),
});
export type AttenuationPoint = z.output<typeof AttenuationPointSchema>;

const balanced = (s: string) => {
  let depth = 0;
  for (const ch of s) {
    if (ch === '(') depth++;
    else if (ch === ')' && --depth < 0) return false;
  }
  return depth === 0;
};

const sourceText = z
  .string({ error: required('is required: say where the figure comes from') })
  .trim()
  .min(1, 'is required: say where the figure comes from')
  .max(500, 'must be at most 500 characters')
  .refine(balanced, 'must close every bracket it opens');

export const PulseVfSchema = z.object({
  pulseWidthNs: num('is required: a pulse width in ns')
    .gt(0, 'must be greater than 0 ns')
    .max(1_000_000, 'must be at most 1000000 ns (1 ms)'),
  vf: num('is required: a velocity factor')
    .gt(0, 'must be greater than 0')
    .max(1, 'must be at most 1 (nothing is faster than light)'),
  source: sourceText,
});
export type PulseVf = z.output<typeof PulseVfSchema>;

const distinct =
  <T>(key: (t: T) => number, field: string, what: string) =>
  (list: T[], ctx: z.RefinementCtx) => {
    const seen = new Map<number, number>();
    list.forEach((item, i) => {
      const k = key(item);
      const first = seen.get(k);
      if (first !== undefined)
        ctx.addIssue({ code: 'custom', path: [i, field], message: `repeats ${what} ${k} (entry ${first + 1})` });
      else seen.set(k, i);
    });
  };

export const attenuationListSchema = z
  .array(AttenuationPointSchema, { error: 'must be a list of { frequencyMhz, dbPer100m }' })
  .max(MAX_ATTENUATION_POINTS, `must have at most ${MAX_ATTENUATION_POINTS} points`)
  .superRefine(distinct((p: AttenuationPoint) => p.frequencyMhz, 'frequencyMhz', 'the frequency'));

export const pulseVfListSchema = z
  .array(PulseVfSchema, { error: 'must be a list of { pulseWidthNs, vf, source }' })
  .max(MAX_PULSE_VFS, `must have at most ${MAX_PULSE_VFS} entries`)
  .superRefine(distinct((p: PulseVf) => p.pulseWidthNs, 'pulseWidthNs', 'the pulse width'));

/** The six line constants; stored as six nullable columns so they diff, import and export like any number. */
export const LINE_CONSTANT_FIELDS = ['rDcOhmPerM', 'skinOhmPerMRootHz', 'lHPerM', 'cFPerM', 'gSPerM', 'lossTangent'] as const;
export type LineConstantField = (typeof LINE_CONSTANT_FIELDS)[number];

export const lineConstantFields = {
  /** Loop resistance of both conductors at DC, Ω/m. */
  rDcOhmPerM: num().min(0, 'must not be negative').max(100, 'must be at most 100 Ω/m').nullable(),
  /** Skin-effect term k_s: R(f) = R_dc + k_s·√f, in Ω/m per √Hz. */
  skinOhmPerMRootHz: num().min(0, 'must not be negative').max(1, 'must be at most 1 Ω/m/√Hz').nullable(),
  /** High-frequency loop inductance, H/m. */
  lHPerM: num().gt(0, 'must be greater than 0 H/m').max(1e-4, 'must be at most 1e-4 H/m (100 µH/m)').nullable(),
  /** Capacitance between the conductors, F/m. */
  cFPerM: num().gt(0, 'must be greater than 0 F/m').max(1e-8, 'must be at most 1e-8 F/m (10 nF/m)').nullable(),
  /** Shunt conductance at DC, S/m. */
  gSPerM: num().min(0, 'must not be negative').max(1, 'must be at most 1 S/m').nullable(),
  /** Dielectric loss tangent tanδ: G(f) = G_dc + 2πf·C·tanδ. */
  lossTangent: num().min(0, 'must not be negative').max(0.5, 'must be at most 0.5').nullable(),
};
export type LineConstants = { [K in LineConstantField]: number | null };

export const LINE_CONSTANT_LABELS: Record<LineConstantField, { label: string; unit: string }> = {
  rDcOhmPerM: { label: 'DC loop resistance R', unit: 'Ω/m' },
  skinOhmPerMRootHz: { label: 'Skin-effect term kₛ', unit: 'Ω/m/√Hz' },
  lHPerM: { label: 'Inductance L', unit: 'H/m' },
  cFPerM: { label: 'Capacitance C', unit: 'F/m' },
  gSPerM: { label: 'DC conductance G', unit: 'S/m' },
  lossTangent: { label: 'Loss tangent tanδ', unit: '' },
};

export interface LossIssue {
  field: string;
  message: string;
}

/**
 * Checks the loss fields of one entry together: a source wherever there are
 * figures, L and C whenever any line constant is given, and L and C that agree
 * with the entry's own Z0 = √(L/C) and VF = 1/(c·√(LC)) (lossless-line
 * formulas, Pozar §2.1) within 30 % and 15 %, which catches a slipped exponent.
 */
export function lossFieldIssues(
  v: Partial<LineConstants> & { attenuation?: AttenuationPoint[]; lossSource?: string | null; z0Ohm?: number; vf?: number },
): LossIssue[] {
  const issues: LossIssue[] = [];
  const anyConstant = LINE_CONSTANT_FIELDS.some((f) => v[f] !== null && v[f] !== undefined);
  if (((v.attenuation?.length ?? 0) > 0 || anyConstant) && !v.lossSource) {
    issues.push({ field: 'lossSource', message: 'is required with loss figures: say where they come from' });
  }
  if (!anyConstant) return issues;
  for (const f of ['lHPerM', 'cFPerM'] as const) {
    if (v[f] === null || v[f] === undefined) issues.push({ field: f, message: 'is required with the other line constants' });
  }
  const { lHPerM: l, cFPerM: c } = v;
  if (!l || !c) return issues;
  const z0 = Math.sqrt(l / c);
  const vf = 1 / (SPEED_OF_LIGHT_M_PER_S * Math.sqrt(l * c));
  if (v.z0Ohm && Math.abs(z0 / v.z0Ohm - 1) > 0.3) {
    issues.push({
      field: 'lHPerM',
      message: `with C gives Z0 = √(L/C) = ${z0.toPrecision(3)} Ω, far from the entry's ${v.z0Ohm} Ω: check the exponents`,
    });
  } else if (v.vf && Math.abs(vf / v.vf - 1) > 0.15) {
    issues.push({
      field: 'cFPerM',
      message: `with L gives VF = 1/(c·√(LC)) = ${vf.toPrecision(3)}, far from the entry's ${v.vf}: check the exponents`,
    });
  }
  return issues;
}

// ---- text forms, for the CSV file and the history ----

const NUMBER = String.raw`[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?`;
const POINT_RE = new RegExp(String.raw`^(${NUMBER})\s*(?:MHz)?\s*:\s*(${NUMBER})\s*(?:dB)?$`, 'i');
const PULSE_RE = new RegExp(String.raw`^(${NUMBER})\s*(?:ns)?\s*:\s*(${NUMBER})\s*\(([\s\S]*)\)$`, 'i');

const trimNumber = (n: number) => String(Number(n.toPrecision(10)));

/** "1 MHz: 2.1 dB; 10 MHz: 6.8 dB" (dB per 100 m), lowest frequency first; '' for none. */
export function formatAttenuationList(points: readonly AttenuationPoint[]): string {
  return [...points]
    .sort((a, b) => a.frequencyMhz - b.frequencyMhz)
    .map((p) => `${trimNumber(p.frequencyMhz)} MHz: ${trimNumber(p.dbPer100m)} dB`)
    .join('; ');
}

/** "100 ns: 0.655 (yard test, drum 4); 1000 ns: 0.63 (yard test)", shortest pulse first; '' for none. */
export function formatPulseVfList(list: readonly PulseVf[]): string {
  return [...list]
    .sort((a, b) => a.pulseWidthNs - b.pulseWidthNs)
    .map((p) => `${trimNumber(p.pulseWidthNs)} ns: ${trimNumber(p.vf)} (${p.source})`)
    .join('; ');
}

/** Splits on ';' outside brackets. */
function entries(text: string): string[] {
  const out: string[] = [];
  let depth = 0;
  let start = 0;
  for (let i = 0; i < text.length; i++) {
    const ch = text[i];
    if (ch === '(') depth++;
    else if (ch === ')') depth = Math.max(0, depth - 1);
    else if (ch === ';' && depth === 0) {
      out.push(text.slice(start, i));
      start = i + 1;
    }
  }
  out.push(text.slice(start));
  return out.map((s) => s.trim()).filter((s) => s !== '');
}

export type TextParse<T> = { ok: true; value: T[] } | { ok: false; error: string };

/** Reads the text form of an attenuation list; the values are checked by the schema afterwards. */
export function parseAttenuationList(text: string): TextParse<AttenuationPoint> {
  const value: AttenuationPoint[] = [];
  for (const [i, part] of entries(text).entries()) {
    const m = POINT_RE.exec(part);
    if (!m)
      return { ok: false, error: `point ${i + 1} "${part}" is not "frequency MHz: attenuation dB" (e.g. "10 MHz: 6.8 dB")` };
    value.push({ frequencyMhz: Number(m[1]), dbPer100m: Number(m[2]) });
  }
  return { ok: true, value };
}

/** Reads the text form of a pulse-width VF list; the values are checked by the schema afterwards. */
export function parsePulseVfList(text: string): TextParse<PulseVf> {
  const value: PulseVf[] = [];
  for (const [i, part] of entries(text).entries()) {
    const m = PULSE_RE.exec(part);
    if (!m)
      return { ok: false, error: `entry ${i + 1} "${part}" is not "width ns: VF (source)" (e.g. "500 ns: 0.64 (yard test)")` };
    value.push({ pulseWidthNs: Number(m[1]), vf: Number(m[2]), source: m[3].trim() });
  }
  return { ok: true, value };
}
