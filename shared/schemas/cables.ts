import { z } from 'zod';
import {
  attenuationListSchema,
  lossFieldIssues,
  lineConstantFields,
  pulseVfListSchema,
  type AttenuationPoint,
  type LineConstants,
  type PulseVf,
} from './cable-loss';
import { foldedNameFits, jsonId, MAX_ID, multiLine, oneLine, required, textId, textInt } from './input';

export * from './cable-loss';

export const CONSTRUCTIONS = ['coax', 'twisted-pair', 'twin-lead', 'shielded-power', 'other'] as const;
export type Construction = (typeof CONSTRUCTIONS)[number];
export const CONSTRUCTION_LABELS: Record<Construction, string> = {
  coax: 'Coaxial',
  'twisted-pair': 'Twisted pair',
  'twin-lead': 'Twin lead',
  'shielded-power': 'Shielded power cable',
  other: 'Other',
};

export const VF_SOURCES = ['datasheet', 'handbook', 'calculated', 'field-calibrated'] as const;
export type VfSource = (typeof VF_SOURCES)[number];
export const VF_SOURCE_LABELS: Record<VfSource, string> = {
  datasheet: 'Datasheet',
  handbook: 'Handbook',
  calculated: 'Calculated',
  'field-calibrated': 'Field-calibrated',
};

export const CALIBRATION_SOURCES = ['manual', 'trace', 'repair-closeout'] as const;
export type CalibrationSource = (typeof CALIBRATION_SOURCES)[number];
export const CALIBRATION_SOURCE_LABELS: Record<CalibrationSource, string> = {
  manual: 'Typed in',
  trace: 'From a trace',
  'repair-closeout': 'Repair close-out',
};
export const CALIBRATION_STATUSES = ['pending', 'accepted', 'rejected'] as const;
export type CalibrationStatus = (typeof CALIBRATION_STATUSES)[number];

const num = (what = 'must be a number') => z.number({ error: required(what) }).finite({ error: what });

/** The fields of one library entry, all in SI. Shared by the form, the API and the CSV import. */
export const cableFields = {
  name: foldedNameFits(oneLine(z.string({ error: required('is required') }).trim().min(1, 'is required').max(120, 'must be at most 120 characters'))),
  construction: z.enum(CONSTRUCTIONS, { error: `must be one of ${CONSTRUCTIONS.join(', ')}` }),
  dielectric: oneLine(z.string({ error: required('is required') }).trim().min(1, 'is required').max(120, 'must be at most 120 characters')),
  z0Ohm: num().gt(0, 'must be greater than 0 Ω').max(10_000, 'must be at most 10000 Ω'),
  vf: num().gt(0, 'must be greater than 0').max(1, 'must be at most 1 (nothing is faster than light)'),
  vfTolerance: num().min(0, 'must not be negative').max(0.5, 'must be at most 0.5 (±50 %)'),
  attenuationDbPer100m: num().min(0, 'must not be negative').max(1000, 'must be at most 1000 dB/100 m').nullable(),
  attenuationFreqMhz: num().gt(0, 'must be greater than 0 MHz').max(100_000, 'must be at most 100000 MHz').nullable(),
  vfSource: z.enum(VF_SOURCES, { error: required(`is required: one of ${VF_SOURCES.join(', ')}`) }),
  vfReference: multiLine(z.string({ error: required('is required') }).trim().min(1, 'is required: say where the VF comes from').max(2000)),
  notes: multiLine(z.string().trim().max(4000, 'must be at most 4000 characters').nullable()),
  /** Attenuation at stated frequencies, dB per 100 m; the engine corrects distance and ρ for it. */
  attenuation: attenuationListSchema,
  /** Where the attenuation figures and line constants come from. */
  lossSource: multiLine(z.string().trim().max(2000, 'must be at most 2000 characters').nullable().transform((s) => (s === '' ? null : s))),
  ...lineConstantFields,
  /** VF measured with a given pulse width; used instead of vf when a trace's pulse width matches. */
  pulseVfs: pulseVfListSchema,
};

type AttenuationPair = { attenuationDbPer100m?: number | null; attenuationFreqMhz?: number | null };
const attenuationPaired = (v: AttenuationPair, ctx: z.RefinementCtx) => {
  const a = v.attenuationDbPer100m ?? null;
  const f = v.attenuationFreqMhz ?? null;
  if (a !== null && f === null) ctx.addIssue({ code: 'custom', path: ['attenuationFreqMhz'], message: 'is required with an attenuation' });
  if (f !== null && a === null) ctx.addIssue({ code: 'custom', path: ['attenuationDbPer100m'], message: 'is required with a frequency' });
};

/**
 * attenuationDbPer100m with attenuationFreqMhz is the older one-point form of
 * `attenuation`: alone it stands for a one-point list; beside a list it must be
 * one of its points.
 */
export function legacyPointClash(v: AttenuationPair & { attenuation?: AttenuationPoint[] }): boolean {
  const a = v.attenuationDbPer100m ?? null;
  const f = v.attenuationFreqMhz ?? null;
  if (a === null || f === null || !v.attenuation?.length) return false;
  return !v.attenuation.some((p) => p.frequencyMhz === f && p.dbPer100m === a);
}
export const LEGACY_POINT_MESSAGE = 'is the one-point form of attenuation: give the points in attenuation, or make this one of them';

const lineConstantDefaults = Object.fromEntries(
  Object.entries(lineConstantFields).map(([k, s]) => [k, s.default(null)]),
) as { [K in keyof typeof lineConstantFields]: z.ZodDefault<(typeof lineConstantFields)[K]> };

export const CableTypeInputSchema = z
  .object({
    ...cableFields,
    attenuationDbPer100m: cableFields.attenuationDbPer100m.default(null),
    attenuationFreqMhz: cableFields.attenuationFreqMhz.default(null),
    notes: cableFields.notes.default(null),
    attenuation: cableFields.attenuation.default([]),
    lossSource: cableFields.lossSource.default(null),
    ...lineConstantDefaults,
    pulseVfs: cableFields.pulseVfs.default([]),
  })
  .superRefine((v, ctx) => {
    attenuationPaired(v, ctx);
    if (legacyPointClash(v)) ctx.addIssue({ code: 'custom', path: ['attenuationDbPer100m'], message: LEGACY_POINT_MESSAGE });
    for (const i of lossFieldIssues(v)) ctx.addIssue({ code: 'custom', path: [i.field], message: i.message });
  })
  .transform((v) => {
    // The one-point form becomes the list; the pair then always reads as the list's lowest point.
    const attenuation =
      v.attenuation.length === 0 && v.attenuationDbPer100m !== null && v.attenuationFreqMhz !== null
        ? [{ frequencyMhz: v.attenuationFreqMhz, dbPer100m: v.attenuationDbPer100m }]
        : [...v.attenuation].sort((a, b) => a.frequencyMhz - b.frequencyMhz);
    return { ...v, attenuation, ...headlinePoint(attenuation), pulseVfs: [...v.pulseVfs].sort((a, b) => a.pulseWidthNs - b.pulseWidthNs) };
  });
export type CableTypeInput = z.output<typeof CableTypeInputSchema>;

/** The lowest-frequency point as the older pair of fields (null, null for none). */
export function headlinePoint(points: readonly AttenuationPoint[]): { attenuationDbPer100m: number | null; attenuationFreqMhz: number | null } {
  const first = [...points].sort((a, b) => a.frequencyMhz - b.frequencyMhz)[0];
  return first ? { attenuationDbPer100m: first.dbPer100m, attenuationFreqMhz: first.frequencyMhz } : { attenuationDbPer100m: null, attenuationFreqMhz: null };
}

export const reasonSchema = multiLine(
  z
    .string({ error: required('is required: say why') })
    .trim()
    .min(3, 'is required: say why (at least 3 characters)')
    .max(2000, 'must be at most 2000 characters'),
);

// Strict: a field name it does not know is refused by name, not dropped while the answer says the change was made.
export const CableTypeUpdateSchema = z
  .strictObject({
    ...cableFields,
  })
  .partial()
  .extend({
    reason: reasonSchema,
    // The values the editor started from, for the fields it changes: where the stored value has moved on since
    // (someone else saved meanwhile), the change is refused with 409 rather than overwriting theirs unseen.
    // Fields nobody else touched merge. Optional, so a script that sends no snapshot still works.
    basedOn: z.object(cableFields).partial().strict().optional(),
  })
  // Attenuation and its frequency are checked against the stored entry by the service: a change may give one of them.
  .refine((v) => Object.keys(v).some((k) => k !== 'reason' && k !== 'basedOn'), { message: 'give at least one field to change', path: ['(body)'] });
export type CableTypeUpdate = z.output<typeof CableTypeUpdateSchema>;

export const CABLE_SORTS = ['name', 'construction', 'dielectric', 'z0Ohm', 'vf', 'vfSource', 'updatedAt'] as const;
export type CableSort = (typeof CABLE_SORTS)[number];

export const CableListQuerySchema = z.strictObject({
  q: z.string().trim().max(100, 'must be at most 100 characters').optional(),
  construction: z.enum(CONSTRUCTIONS, { error: `must be one of ${CONSTRUCTIONS.join(', ')}` }).optional(),
  page: textInt({ min: 1, max: 1_000_000, what: 'a page number' }).default(1),
  pageSize: textInt({ min: 1, max: 200, what: 'a page size' }).default(25),
  sort: z.enum(CABLE_SORTS, { error: `must be one of ${CABLE_SORTS.join(', ')}` }).default('name'),
  dir: z.enum(['asc', 'desc'], { error: 'must be asc or desc' }).default('asc'),
});
export type CableListQuery = z.output<typeof CableListQuerySchema>;

export const CalibrationSubmitSchema = z.strictObject({
  cableTypeId: z.number({ error: required('is required') }).int('must be a whole number').positive('must be a positive whole number').max(MAX_ID, `must be at most ${MAX_ID}`),
  knownLengthM: num('is required: a number of metres').gt(0, 'must be greater than 0 m').max(100_000, 'must be at most 100 km'),
  roundTripNs: num('is required: a number of nanoseconds').gt(0, 'must be greater than 0 ns').max(10_000_000, 'must be at most 10 ms'),
  source: z.enum(CALIBRATION_SOURCES, { error: `must be one of ${CALIBRATION_SOURCES.join(', ')}` }).default('manual'),
  traceId: jsonId('must be a trace id').nullable().optional(),
  note: multiLine(z.string().trim().max(2000, 'must be at most 2000 characters').optional()),
});
export type CalibrationSubmitInput = z.input<typeof CalibrationSubmitSchema>;

/**
 * A calibration filed through the API: by hand, or read off a trace (which it names). 'repair-closeout' is only
 * ever written by a repair's close-out, so a calibration cannot claim a crew's found position it does not have.
 */
export const CalibrationFileSchema = CalibrationSubmitSchema.extend({
  source: z.enum(['manual', 'trace'], { error: 'must be manual or trace (a repair close-out files its own calibration)' }).default('manual'),
}).superRefine((v, ctx) => {
  if (v.source === 'trace' && (v.traceId === null || v.traceId === undefined)) {
    ctx.addIssue({ code: 'custom', path: ['traceId'], message: 'is required: the trace the calibration was read from' });
  }
});

export const CalibrationListQuerySchema = z.strictObject({
  status: z.enum([...CALIBRATION_STATUSES, 'all'], { error: `must be one of ${CALIBRATION_STATUSES.join(', ')}, all` }).default('pending'),
  cableTypeId: textId('a cable type id').optional(),
  page: textInt({ min: 1, max: 1_000_000, what: 'a page number' }).default(1),
  pageSize: textInt({ min: 1, max: 100, what: 'a page size' }).default(25),
});

export const CalibrationAcceptSchema = z.strictObject({
  /** The VF to store, when the reviewer takes the mean of the accepted calibrations; the calibration's own VF otherwise. */
  vf: cableFields.vf.optional(),
  /** Optional new tolerance to store with the accepted VF; the entry's stays otherwise. */
  vfTolerance: cableFields.vfTolerance.optional(),
  note: multiLine(z.string().trim().max(2000).optional()),
  /**
   * What the reviewer's form started from: the library VF and tolerance it showed, and how many calibrations of the
   * cable type were accepted (the proposed mean is theirs with this one added). Where another planner accepted one,
   * or changed the VF or tolerance, since, the accept is refused (409) rather than storing a mean that leaves theirs
   * out. Optional, so a script that sends no snapshot still works.
   */
  basedOn: z
    .strictObject({
      vf: cableFields.vf,
      vfTolerance: cableFields.vfTolerance,
      acceptedCount: z.number().int().min(0).max(1_000_000),
    })
    .optional(),
});
export const CalibrationRejectSchema = z.strictObject({ reason: reasonSchema });

// ---- what the API answers ----

export interface CableTypeView {
  id: number;
  name: string;
  construction: Construction;
  dielectric: string;
  z0Ohm: number;
  vf: number;
  vfTolerance: number;
  attenuationDbPer100m: number | null;
  attenuationFreqMhz: number | null;
  vfSource: VfSource;
  vfReference: string;
  notes: string | null;
  /** Lowest frequency first. attenuationDbPer100m / attenuationFreqMhz above repeat its first point. */
  attenuation: AttenuationPoint[];
  lossSource: string | null;
  rDcOhmPerM: LineConstants['rDcOhmPerM'];
  skinOhmPerMRootHz: LineConstants['skinOhmPerMRootHz'];
  lHPerM: LineConstants['lHPerM'];
  cFPerM: LineConstants['cFPerM'];
  gSPerM: LineConstants['gSPerM'];
  lossTangent: LineConstants['lossTangent'];
  /** Shortest pulse first. */
  pulseVfs: PulseVf[];
  revision: number;
  createdAt: string;
  updatedAt: string;
}

export interface FieldChangeView {
  field: string;
  from: string | number | null;
  to: string | number | null;
}

export interface CableTypeChangeView {
  id: number;
  revision: number;
  kind: 'create' | 'update' | 'import' | 'calibration';
  reason: string;
  changes: FieldChangeView[];
  changedBy: { id: number; name: string } | null;
  calibrationId: number | null;
  createdAt: string;
}

export interface CalibrationView {
  id: number;
  /** currentVf: the library's VF now (it may have changed since submission). */
  cableType: { id: number; name: string; currentVf: number | null };
  knownLengthM: number;
  roundTripNs: number;
  vf: number;
  libraryVf: number;
  /** (vf − libraryVf) / libraryVf at submission. */
  deviation: number;
  source: CalibrationSource;
  traceId: number | null;
  /** The repair ticket whose close-out filed it (source 'repair-closeout'), else null. */
  ticketId: number | null;
  /**
   * Why it cannot be accepted yet, or null: a close-out's calibration waits for its repair to be signed off, and
   * one whose ticket was reopened and closed out again is not taken at all (reject it).
   */
  acceptHeld: string | null;
  note: string | null;
  status: CalibrationStatus;
  submittedBy: { id: number; name: string } | null;
  reviewedBy: { id: number; name: string } | null;
  reviewedAt: string | null;
  reviewReason: string | null;
  createdAt: string;
}
