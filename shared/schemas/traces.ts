import { z } from 'zod';
import { CALIBRATION_VF_MIN } from '../cable/calibration';
import { deviceAnalysisField, type DeviceAnalysis } from './device-analysis';
import { formNumber, multiLine, textId, textInt } from './input';
import type { TraceAnalysis } from './trace-analysis';
import type { RouteMarkerView } from './sites';

export const CABLE_ENDS = ['A', 'B'] as const;
export type CableEnd = (typeof CABLE_ENDS)[number];
/** 'ok': analysed; 'failed': could not be analysed (the reason is kept); 'pending': a large upload waiting for its background analysis. */
export const TRACE_STATUSES = ['ok', 'failed', 'pending'] as const;
export type TraceStatus = (typeof TRACE_STATUSES)[number];

/**
 * Multipart form fields arrive as text; an empty field means "not given".
 * `formNumber` reads plain decimals only ("0x10", "1e999" are refused).
 */
const optionalNumber = (what: string, check: (v: number) => boolean, rule: string) =>
  formNumber({ what: `${what} as a number` }).refine((v) => v === undefined || check(v), `${what} ${rule}`);

// Strict: a form field it does not know (a slip such as "pulsewidthNs" or "vfOveride") is refused by name, not dropped
// while the trace is analysed on the defaults the technician meant to change.
export const TraceUploadSchema = z
  .strictObject({
    cableRunId: textId('the id of a cable run (choose a cable run)'),
    end: z.enum(CABLE_ENDS, { error: 'must be A or B (the end the instrument was connected to)' }),
    mode: z.preprocess((v) => (v === '' ? undefined : v), z.enum(['auto', 'step', 'pulse']).default('auto')),
    pulseWidthNs: optionalNumber('pulse width', (v) => v > 0 && v < 1e6, 'must be more than 0 ns'),
    zeroOffsetNs: optionalNumber('zero offset', (v) => Math.abs(v) < 1e6, 'must be under 1 ms'),
    leadLengthM: optionalNumber('test-lead length', (v) => v >= 0 && v < 1000, 'must be between 0 and 1000 m'),
    // 1 ps is finer than any field TDR samples (common practice); smaller is a unit slip.
    sampleIntervalNs: optionalNumber('sample interval', (v) => v >= 0.001 && v < 1e9, 'must be at least 0.001 ns (1 ps) and under 1 s'),
    // Below VF 0.2 no practical cable is that slow: almost always a unit slip (see shared/cable/calibration.ts).
    vfOverride: optionalNumber('velocity factor', (v) => v >= CALIBRATION_VF_MIN && v <= 1, `must be between ${CALIBRATION_VF_MIN} and 1 (no practical cable is slower, nothing is faster than light)`),
    vfOverrideReason: multiLine(
      z
        .string()
        .trim()
        .max(500)
        .optional()
        .transform((v) => (v ? v : undefined)),
    ),
    /** The phone's own analysis of the file, when it was analysed there before the upload. */
    deviceAnalysis: deviceAnalysisField,
  })
  .superRefine((v, ctx) => {
    if (v.vfOverride !== undefined && !v.vfOverrideReason) {
      ctx.addIssue({ code: 'custom', path: ['vfOverrideReason'], message: 'give a reason when overriding the velocity factor' });
    }
  });
export type TraceUploadInput = z.input<typeof TraceUploadSchema>;

/** The settings a trace was analysed with, as the technician gave them. */
export interface TraceSettings {
  mode: 'auto' | 'step' | 'pulse';
  pulseWidthNs?: number;
  zeroOffsetNs?: number;
  leadLengthM?: number;
  sampleIntervalNs?: number;
  vfOverride?: number;
}

export const TRACE_SORTS = ['createdAt', 'originalName', 'status', 'end'] as const;

export const TraceListQuerySchema = z.strictObject({
  siteId: textId().optional(),
  cableRunId: textId().optional(),
  end: z.enum(CABLE_ENDS).optional(),
  status: z.enum(TRACE_STATUSES).optional(),
  uploadedById: textId().optional(),
  from: z.iso.date({ error: 'must be a date, YYYY-MM-DD' }).optional(),
  to: z.iso.date({ error: 'must be a date, YYYY-MM-DD' }).optional(),
  /** Text search in the file name. */
  q: z.string().trim().max(100, 'must be at most 100 characters').optional(),
  sort: z.enum(TRACE_SORTS).default('createdAt'),
  dir: z.enum(['asc', 'desc']).default('desc'),
  page: textInt({ min: 1, max: 1_000_000, what: 'a page number' }).default(1),
  pageSize: textInt({ min: 1, max: 100, what: 'a page size' }).default(25),
}).refine((v) => v.from === undefined || v.to === undefined || v.from <= v.to, {
  path: ['to'],
  message: 'must be the same day as "from" or later',
});
export type TraceListQuery = Partial<z.output<typeof TraceListQuerySchema>>;

export const TraceViewQuerySchema = z.strictObject({
  points: textInt({ min: 100, max: 20000, what: 'a number of points' }).default(2000),
  compareTo: textId('the id of a trace').optional(),
});

export const ReferenceSchema = z.strictObject({ isReference: z.boolean({ error: 'must be true or false' }) });

export interface TraceSummary {
  id: number;
  cableRunId: number;
  cableRunName: string;
  siteId: number;
  siteName: string;
  end: CableEnd;
  endLabel: string;
  originalName: string;
  sizeBytes: number;
  sha256: string;
  status: TraceStatus;
  errorMessage: string | null;
  uploadedBy: { id: number; name: string };
  createdAt: string;
  isReference: boolean;
  eventCount: number;
  findingCount: number;
}

export interface TraceError {
  code: string;
  message: string;
  line: number | null;
  field: string | null;
}

export interface TraceFindingRef {
  id: number;
  eventIndex: number;
  status: 'confirmed' | 'dismissed';
  kind: string;
}

export interface TraceComparison {
  referenceTraceId: number;
  referenceName: string;
  /** The reference resampled onto this trace's time axis. */
  reference: Array<{ t: number; y: number }>;
  /** This trace minus the reference, on this trace's time axis. */
  difference: Array<{ t: number; y: number }>;
  /** Indexes of this trace's events with no matching event in the reference. */
  newEventIndexes: number[];
  /** Reference events no longer seen. */
  missingReferenceEvents: Array<{ index: number; distanceM: number; type: string }>;
}

export interface TraceDetail extends TraceSummary {
  settings: TraceSettings;
  vf: number;
  vfTolerance: number;
  z0Ohm: number | null;
  vfOverrideReason: string | null;
  engineVersion: string;
  cableTypeRevision: number | null;
  /** True when the cable library's VF/Z0 has changed since this trace was analysed, or its run was given another cable type. */
  libraryChangedSince: boolean;
  /** The cable type the trace was analysed as, where its run has been given another since (null when it is the run's type, or unknown). */
  analysedCableType: { id: number; name: string } | null;
  /** The trace whose analysis this one replaces (same stored file), if this is a re-analysis. */
  reanalysisOfId: number | null;
  /** Later re-analyses of this trace's file, oldest first. */
  reanalysedAs: number[];
  error: TraceError | null;
  analysis: TraceAnalysis | null;
  /** Time on the samples' axis (ns) that is distance zero. */
  zeroNs: number;
  /** Decimated samples: t = time in ns on the file's axis, y = amplitude. */
  samples: Array<{ t: number; y: number }>;
  sampleCount: number;
  cableRun: {
    id: number;
    name: string;
    installedLengthM: number;
    endALabel: string;
    endBLabel: string;
    cableTypeName: string;
    markers: RouteMarkerView[];
  };
  findings: TraceFindingRef[];
  comparison: TraceComparison | null;
  /** What the phone made of the file before it was uploaded, when it was analysed on a device. */
  deviceAnalysis: DeviceAnalysis | null;
}

/** A file of an upload that was not stored because the same bytes were already uploaded for that run and end within a day. */
export interface DuplicateFile {
  originalName: string;
  /** The trace already holding these bytes. */
  traceId: number;
  uploadedAt: string;
}

export interface UploadResult {
  /** The traces stored by this upload, in file order (readable or marked failed). */
  traces: TraceDetail[];
  /** Files not stored again because they were already uploaded. */
  duplicates: DuplicateFile[];
  /** True when this answers a retry: the same Idempotency-Key was seen before and nothing new was stored. */
  replayed: boolean;
}

/** The Idempotency-Key header of an upload: 8 to 128 letters, digits, dots, dashes, underscores or colons. */
export const IDEMPOTENCY_KEY = /^[A-Za-z0-9._:-]{8,128}$/;

/** A sample trace file offered to try an upload with while the demo data is on (GET /api/sample-traces). */
export interface SampleTrace {
  file: string;
  /** What the trace shows, in words. */
  title: string;
  sizeBytes: number;
  siteId: number;
  siteName: string;
  /** The demo run and end it was taken on: the upload form is filled in with them. */
  cableRunId: number;
  cableRunName: string;
  end: 'A' | 'B';
  endLabel: string;
  /** The trace these bytes are already stored as on that run and end (an upload would be refused as a copy), or null. */
  triedAsTraceId: number | null;
}
