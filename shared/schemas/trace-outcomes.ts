import { z } from 'zod';
import { multiLine, required, textInt, textNumber } from './input';

const eventIndex = z
  .number({ error: required('is required: the number of the event (counting from 0)') })
  .int('must be a whole number')
  .min(0, 'must be 0 or more')
  .max(100_000, 'must be an event of this trace');

const note = multiLine(
  z
    .string({ error: 'must be text' })
    .trim()
    .max(2000, 'must be at most 2000 characters')
    .optional()
    .transform((v) => (v ? v : undefined)),
);

/** "Far end, cable healthy": the event that is the run's far end on a cable with no fault. */
export const HealthyOutcomeSchema = z.strictObject({ eventIndex, note });
export type HealthyOutcomeInput = z.input<typeof HealthyOutcomeSchema>;

/** "Calibrate the VF from this known length": the far-end event and the length it is known to be (metres). */
export const TraceCalibrationSchema = z.strictObject({
  eventIndex,
  knownLengthM: z
    .number({ error: required('is required: the known length of the run, in metres') })
    .finite('must be a number')
    .gt(0, 'must be more than 0 m')
    .max(100_000, 'must be at most 100 km'),
  note,
});
export type TraceCalibrationInput = z.input<typeof TraceCalibrationSchema>;

/** Archiving or restoring a trace always says why. */
export const ArchiveReasonSchema = z.strictObject({
  reason: multiLine(
    z
      .string({ error: required('is required: say why') })
      .trim()
      .min(3, 'is required: say why (at least 3 characters)')
      .max(2000, 'must be at most 2000 characters'),
  ),
});

/** A window of a trace's samples, for drawing a zoomed view at full detail. */
export const SampleWindowQuerySchema = z
  .object({
    fromNs: textNumber({ min: -1e9, max: 1e9, what: 'a time in ns' }),
    toNs: textNumber({ min: -1e9, max: 1e9, what: 'a time in ns' }),
    points: textInt({ min: 100, max: 20000, what: 'a number of points' }).default(2000),
  })
  .refine((q) => q.toNs > q.fromNs, { path: ['toNs'], message: 'must be later than fromNs' });

export const ARCHIVED_LIST_PAGE_SIZE = 25;
export const ArchivedListQuerySchema = z.strictObject({
  page: textInt({ min: 1, max: 1_000_000, what: 'a page number' }).default(1),
});

export const TRACE_OUTCOME_KINDS = ['far-end-healthy', 'calibration-filed'] as const;
export type TraceOutcomeKind = (typeof TRACE_OUTCOME_KINDS)[number];

export interface TraceOutcomeView {
  id: number;
  traceId: number;
  cableRunId: number;
  kind: TraceOutcomeKind;
  eventIndex: number;
  /** The far end's distance as read (the run's measured electrical length from the measured end). */
  measuredLengthM: number;
  windowStartM: number;
  windowEndM: number;
  /** The run's recorded length when this was recorded. */
  installedLengthM: number;
  vf: number;
  calibrationId: number | null;
  note: string | null;
  recordedBy: { id: number; name: string };
  createdAt: string;
}

export type ArchiveAction = 'archived' | 'restored';

export interface TraceArchiveEventView {
  id: number;
  action: ArchiveAction;
  reason: string;
  by: { id: number; name: string };
  createdAt: string;
}

/** Whether a trace is archived, with every archive and restore, oldest first. */
export interface TraceArchiveView {
  traceId: number;
  archived: boolean;
  archivedAt: string | null;
  history: TraceArchiveEventView[];
}

export interface TraceOutcomesView {
  outcomes: TraceOutcomeView[];
  archive: TraceArchiveView;
}

export interface ArchivedTraceView {
  id: number;
  originalName: string;
  siteName: string;
  cableRunName: string;
  end: 'A' | 'B';
  status: 'ok' | 'failed' | 'pending';
  uploadedBy: { id: number; name: string };
  createdAt: string;
  archivedAt: string;
  archivedBy: { id: number; name: string };
  reason: string;
}

export interface SampleWindowView {
  fromNs: number;
  toNs: number;
  /** Min/max decimated samples inside the window: t = time in ns on the file's axis. */
  samples: Array<{ t: number; y: number }>;
  /** How many recorded samples lie in the window (all of them are drawn when this is at most twice the points asked for). */
  samplesInWindow: number;
}
