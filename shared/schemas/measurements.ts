import { z } from 'zod';
import type { RoutePosition } from '../field/route-position';
import type { GroundPlace } from '../locate/route-geo';
import { CONDUCTOR_MATERIALS, type ConductorMaterial } from '../locate';
import type { FusedMethod } from '../locate/fuse';
import { jsonId, MAX_ID, MAX_LENGTH_M, multiLine, oneLine, optionalNote, required } from './input';

/** Readings other than TDR traces, kept with who took them, when and with what. */
export const MEASUREMENT_KINDS = ['murray', 'varley', 'capacitance', 'loop-resistance'] as const;
export type MeasurementKind = (typeof MEASUREMENT_KINDS)[number];
export const MEASUREMENT_KIND_LABELS: Record<MeasurementKind, string> = {
  murray: 'Murray loop',
  varley: 'Varley loop',
  capacitance: 'Capacitance',
  'loop-resistance': 'Loop resistance',
};

/** active: in use; corrected: replaced by a newer version; withdrawn: taken back with a reason. */
export const MEASUREMENT_STATUSES = ['active', 'corrected', 'withdrawn'] as const;
export type MeasurementStatus = (typeof MEASUREMENT_STATUSES)[number];

const num = (what: string) => z.number({ error: `must be a number (${what})` });
const positive = (what: string) => num(what).gt(0, `must be more than 0 (${what})`);
const nonNegative = (what: string) => num(what).min(0, `must not be negative (${what})`);

/*
 * Upper bounds, so that no reading is large enough to overflow the location formulas (two arms of
 * 1e308 Ω sum to Infinity): common practice, each far above any real reading. Resistances at most
 * 1 TΩ (the top of insulation testers' ranges), capacitances at most 1 mF (a 100 km cable at
 * 100 pF/m holds 10 µF), lengths at most 100 km as everywhere in Rholog.
 */
const MAX_OHM = 1e12;
const MAX_FARAD = 1e-3;
const ohm = (reading: z.ZodNumber) => reading.max(MAX_OHM, 'must be at most 1e12 Ω (1 TΩ)');
const farad = (reading: z.ZodNumber) => reading.max(MAX_FARAD, 'must be at most 0.001 F (1 mF)');
const share = (reading: z.ZodNumber) => reading.max(1, 'must be at most 1 (a share of the loop)');
const id = (what: string) => jsonId(`must be ${what}`);

const sectionSchema = z.strictObject({
  lengthM: positive('metres').max(MAX_LENGTH_M, `must be at most ${MAX_LENGTH_M} m`),
  material: z.enum(CONDUCTOR_MATERIALS as [ConductorMaterial, ...ConductorMaterial[]], { error: 'must be copper or aluminium' }),
  sizeMm2: positive('mm²').max(5000, 'must be at most 5000 mm²').optional(),
  ohmPerM20: positive('Ω/m at 20 °C').max(100, 'must be at most 100 Ω/m').optional(),
  relativeU: nonNegative('a fraction').max(1, 'must be at most 1').optional(),
});
const sectionsSchema = z
  .array(sectionSchema, { error: 'must be a list of conductor sections from end A' })
  .min(1, 'needs at least one section')
  .max(50, 'must have at most 50 sections');
const endSchema = z.enum(['A', 'B'], { error: 'must be A or B' });
const temperature = {
  temperatureC: num('°C').min(-50, 'must be at least −50 °C').max(250, 'must be at most 250 °C').optional(),
  temperatureUK: nonNegative('K').max(50, 'must be at most 50 K').optional(),
};
const loop = {
  fromEnd: endSchema,
  faulty: sectionsSchema,
  sound: z
    .union([z.literal('same'), z.literal('unknown'), sectionsSchema], {
      error: "must be 'same', 'unknown' or a list of sections",
    })
    .optional(),
  ...temperature,
};

export const MurrayReadingsSchema = z.strictObject({
  ...loop,
  ratio: num('a share of the loop, 0–1').optional(),
  faultySideArmOhm: ohm(positive('Ω')).optional(),
  soundSideArmOhm: ohm(positive('Ω')).optional(),
  ratioStep: share(nonNegative('the ratio resolution')).optional(),
  ratioAccuracy: share(nonNegative('± the ratio')).optional(),
  loopOhm: ohm(positive('Ω')).optional(),
  ohmStep: ohm(nonNegative('Ω')).optional(),
  accuracyPct: nonNegative('%').max(100, 'must be at most 100 %').optional(),
});

export const VarleyReadingsSchema = z.strictObject({
  ...loop,
  armRatio: positive('a/b').max(1e6, 'must be at most 1000000 (a/b)'),
  rheostatOhm: ohm(nonNegative('Ω')),
  loopOhm: ohm(positive('Ω')).optional(),
  ohmStep: ohm(nonNegative('Ω')).optional(),
  accuracyPct: nonNegative('%').max(100, 'must be at most 100 %').optional(),
});

export const CapacitanceReadingsSchema = z.strictObject({
  fromEnd: endSchema,
  measuredF: farad(positive('F')),
  soundF: farad(positive('F')).optional(),
  otherEndF: farad(positive('F')).optional(),
  perMF: positive('F/m').max(MAX_FARAD, 'must be at most 0.001 F/m').optional(),
  perMRelativeU: nonNegative('a fraction').max(1, 'must be at most 1').optional(),
  uniformityRelativeU: nonNegative('a fraction').max(1, 'must be at most 1').optional(),
  leadF: farad(nonNegative('F')).optional(),
  leadUF: farad(nonNegative('F')).optional(),
  stepF: farad(nonNegative('F')).optional(),
  accuracyPct: nonNegative('%').max(100, 'must be at most 100 %').optional(),
});

export const LoopResistanceReadingsSchema = z.strictObject({
  fromEnd: endSchema,
  loopOhm: ohm(positive('Ω')),
  leadOhm: ohm(nonNegative('Ω')).optional(),
  faultOhmMax: ohm(nonNegative('Ω')).optional(),
  first: sectionsSchema,
  second: z.union([z.literal('same'), sectionsSchema], { error: "must be 'same' or a list of sections" }).optional(),
  ...temperature,
  ohmStep: ohm(nonNegative('Ω')).optional(),
  accuracyPct: nonNegative('%').max(100, 'must be at most 100 %').optional(),
});

export type MurrayReadings = z.output<typeof MurrayReadingsSchema>;
export type VarleyReadings = z.output<typeof VarleyReadingsSchema>;
export type CapacitanceReadings = z.output<typeof CapacitanceReadingsSchema>;
export type LoopResistanceReadings = z.output<typeof LoopResistanceReadingsSchema>;

export type MeasurementReadings =
  | { kind: 'murray'; readings: MurrayReadings }
  | { kind: 'varley'; readings: VarleyReadings }
  | { kind: 'capacitance'; readings: CapacitanceReadings }
  | { kind: 'loop-resistance'; readings: LoopResistanceReadings };

const record = {
  /** Make, model and serial of the bridge or meter. */
  instrument: oneLine(
    z
      .string({ error: required('is required: the instrument used') })
      .trim()
      .min(1, 'is required: the instrument used')
      .max(200, 'must be at most 200 characters'),
  ),
  /** When the reading was taken (ISO 8601); defaults to now. */
  measuredAt: z.iso
    .datetime({ offset: true, error: 'must be a date and time (ISO 8601)' })
    // A year typed with two digits ("0026") is a valid ISO date; no reading entered here predates 1900.
    .refine((v) => Date.parse(v) >= Date.UTC(1900, 0, 1), 'must be in 1900 or later (check the year)')
    .optional(),
  note: optionalNote(2000),
};

const kindError = { error: `must be one of ${MEASUREMENT_KINDS.join(', ')}` };

/** The four kinds of reading, each with its own readings and the given extra fields. */
function byKind<T extends z.ZodRawShape>(extra: T) {
  return z.discriminatedUnion(
    'kind',
    [
      z.strictObject({ kind: z.literal('murray'), readings: MurrayReadingsSchema, ...record, ...extra }),
      z.strictObject({ kind: z.literal('varley'), readings: VarleyReadingsSchema, ...record, ...extra }),
      z.strictObject({ kind: z.literal('capacitance'), readings: CapacitanceReadingsSchema, ...record, ...extra }),
      z.strictObject({ kind: z.literal('loop-resistance'), readings: LoopResistanceReadingsSchema, ...record, ...extra }),
    ],
    kindError,
  );
}

/** A new measurement, on a finding (its run is the finding's) or on a cable run. */
export const MeasurementInputSchema = byKind({
  findingId: id('a finding id').optional(),
  cableRunId: id('a cable run id').optional(),
}).superRefine((v, ctx) => {
  if (v.findingId === undefined && v.cableRunId === undefined)
    ctx.addIssue({
      code: 'custom',
      path: ['findingId'],
      message: 'is required: the finding (or give cableRunId) the reading belongs to',
    });
});
export type MeasurementInput = z.input<typeof MeasurementInputSchema>;

/** A corrected version: the same kind, new readings, and why. */
export const MeasurementCorrectionSchema = byKind({
  reason: multiLine(
    z
      .string({ error: required('is required: why it is corrected') })
      .trim()
      .min(3, 'is required: why it is corrected')
      .max(2000, 'must be at most 2000 characters'),
  ),
});

export const MeasurementWithdrawSchema = z.strictObject({
  reason: multiLine(
    z
      .string({ error: required('is required: why it is withdrawn') })
      .trim()
      .min(3, 'is required: why it is withdrawn')
      .max(2000, 'must be at most 2000 characters'),
  ),
});

const queryId = (what: string) =>
  z
    .string({ error: `must be ${what}` })
    .regex(/^[1-9]\d{0,9}$/, `must be ${what}`)
    .transform(Number)
    .refine((n) => n <= MAX_ID, `must be ${what} (at most ${MAX_ID})`);

export const MeasurementListQuerySchema = z.strictObject({
  cableRunId: queryId('a cable run id').optional(),
  findingId: queryId('a finding id').optional(),
  /** Also the corrected and withdrawn ones. */
  all: z.enum(['true', 'false'], { error: 'must be true or false' }).optional(),
});

/**
 * One method's estimate as the finding shows it: the fused method's figures (used: false also for a
 * single-ended reading already in a two-ended one), without its budget and notes, and where the reading is kept.
 */
export interface LocationMethodView extends Omit<FusedMethod, 'budget' | 'notes'> {
  findingId: number | null;
  traceId: number | null;
  measurementId: number | null;
  note: string | null;
}

/** The best location of a fault from every reading of it, on the axis from end A. */
export interface BestLocationView {
  distanceFromAM: number | null;
  standardUncertaintyM: number | null;
  windowStartM: number | null;
  windowEndM: number | null;
  coverageFactor: number;
  consistent: boolean;
  outlier?: { methodId: string; label: string; offsetM: number; sigmas: number };
  verdict: string;
  checks: string[];
  test: { chiSquare: number; degreesOfFreedom: number; limit95: number; birgeRatio: number } | null;
  methods: LocationMethodView[];
  /** Readings that could not be used, and why. */
  excluded: Array<{ label: string; findingId: number | null; measurementId: number | null; reason: string }>;
  routePosition: RoutePosition | null;
  routePositionText: string | null;
  /** The best location on the ground between route markers with coordinates (straight between them), or null. */
  ground: GroundPlace | null;
  /** Why there is no estimated coordinate, when there is none. */
  groundNote: string | null;
  assumptions: string[];
}

export interface MeasurementView {
  id: number;
  cableRunId: number;
  findingId: number | null;
  kind: MeasurementKind;
  readings: MeasurementReadings['readings'];
  instrument: string;
  measuredAt: string;
  note: string | null;
  status: MeasurementStatus;
  recordedBy: { id: number; name: string };
  recordedAt: string;
  supersedesId: number | null;
  changeReason: string | null;
  withdrawnBy: { id: number; name: string } | null;
  withdrawnAt: string | null;
  withdrawReason: string | null;
  /** The estimate the readings give on the run as it is now, or why they give none. */
  estimate: {
    fromEnd: 'A' | 'B';
    distanceFromEndM: number;
    distanceFromAM: number;
    standardUncertaintyM: number;
    windowStartM: number;
    windowEndM: number;
  } | null;
  estimateError: string | null;
}
