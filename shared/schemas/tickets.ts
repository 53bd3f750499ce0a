import { z } from 'zod';
import { jsonId, lengthM, multiLine, oneLine, required, textId, textInt } from './input';
import type { RoutePosition } from '../field/route-position';
import { FINDING_KINDS } from './findings';
import type { MailJobView } from './outbox';
import type { BestLocationView } from './measurements';
import type { MethodAccuracyRow, MethodScoreView } from './method-scores';
import { TICKET_PRIORITIES, TICKET_STATUSES, type TicketPriority, type TicketStatus } from '../tickets/status';

const id = (what: string) => jsonId(`must be ${what}`);
const text = (max: number) =>
  z
    .string({ error: 'must be text' })
    .trim()
    .max(max, `must be at most ${max} characters`)
    .nullish()
    .transform((v) => (v ? v : null));
const dueDate = z
  .string({ error: 'must be a date (YYYY-MM-DD)' })
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'must be a date (YYYY-MM-DD)')
  .refine((v) => !Number.isNaN(Date.parse(`${v}T00:00:00Z`)) && new Date(`${v}T00:00:00Z`).toISOString().startsWith(v), 'is not a real date')
  // A repair due more than five years out is a slip of the keyboard (9999-12-31), not a plan.
  .refine((v) => Date.parse(`${v}T00:00:00Z`) <= Date.now() + 5 * 366 * 86_400_000, 'is more than five years ahead')
  .nullish()
  .transform((v) => v ?? null);
const priority = z.enum(TICKET_PRIORITIES, { error: `must be one of ${TICKET_PRIORITIES.join(', ')}` });

export const TicketCreateSchema = z.strictObject({
  findingIds: z
    .array(id('a finding id'), { error: 'must list at least one finding' })
    .min(1, 'must list at least one finding')
    .max(20, 'may list at most 20 findings'),
  title: oneLine(text(160)),
  assigneeId: id('a user id').nullish().transform((v) => v ?? null),
  priority: priority.default('normal'),
  // A new ticket cannot be due in the past (a day's grace for time zones).
  dueDate: dueDate.refine((v) => v === null || Date.parse(`${v}T00:00:00Z`) >= Date.now() - 2 * 86_400_000, 'is in the past'),
  notes: multiLine(text(4000)),
});
export type TicketCreateInput = z.input<typeof TicketCreateSchema>;

// Strict: a field name it does not know is refused by name, not dropped while the answer says the change was made.
export const TicketUpdateSchema = z
  .strictObject({
    title: oneLine(z.string({ error: 'must be text' }).trim().min(1, 'is required').max(160, 'must be at most 160 characters')),
    assigneeId: id('a user id').nullable(),
    priority,
    dueDate,
    notes: multiLine(text(4000)),
    comment: multiLine(text(2000)),
    /**
     * The values the editor started from, for the fields it changes: where one has moved on since (another
     * supervisor saved meanwhile), the change is refused with 409 rather than overwriting theirs unseen.
     */
    basedOn: z
      .strictObject({
        title: z.string({ error: 'must be text' }),
        assigneeId: id('a user id').nullable(),
        priority,
        dueDate: z.string({ error: 'must be a date (YYYY-MM-DD) or null' }).nullable(),
        notes: z.string({ error: 'must be text or null' }).max(4000, 'must be at most 4000 characters').nullable(),
      })
      .partial(),
  })
  .partial()
  .refine((v) => Object.keys(v).some((k) => k !== 'comment' && k !== 'basedOn'), 'give at least one field to change');
export type TicketUpdateInput = z.input<typeof TicketUpdateSchema>;

export const TicketMoveSchema = z.strictObject({
  to: z.enum(TICKET_STATUSES, { error: `must be one of ${TICKET_STATUSES.join(', ')}` }),
  comment: multiLine(text(2000)),
});

export const TicketCommentSchema = z.strictObject({
  comment: multiLine(z.string({ error: required('is required') }).trim().min(1, 'is required').max(2000, 'must be at most 2000 characters')),
});

export const FoundPositionSchema = z.discriminatedUnion(
  'method',
  [
    z.strictObject({
      method: z.literal('distance'),
      fromEnd: z.enum(['A', 'B'], { error: 'must be A or B' }),
      distanceM: lengthM('the distance'),
    }),
    z.strictObject({
      method: z.literal('marker'),
      markerId: id('a route marker id'),
      offsetM: lengthM('the offset (metres past the marker toward end B)'),
    }),
  ],
  { error: 'must say how the position was found: method "distance" (fromEnd, distanceM) or "marker" (markerId, offsetM)' },
);

export const CloseoutSchema = z.strictObject({
  /** Which of the ticket's findings the found position answers (optional when the ticket has one). */
  findingId: id('a finding id of this ticket').optional(),
  found: FoundPositionSchema,
  cause: z.enum(FINDING_KINDS, { error: `must be one of ${FINDING_KINDS.join(', ')}` }),
  workDone: multiLine(z.string({ error: required('is required') }).trim().min(1, 'is required: say what was done').max(4000, 'must be at most 4000 characters')),
  /** File the implied VF as a field calibration (turn off when the fault found was not the one located). */
  fileCalibration: z.boolean({ error: 'must be true or false' }).default(true),
  comment: multiLine(text(2000)),
});
export type CloseoutInput = z.input<typeof CloseoutSchema>;

export const TicketListQuerySchema = z.strictObject({
  status: z.enum([...TICKET_STATUSES, 'open', 'all'], { error: `must be open, all or one of ${TICKET_STATUSES.join(', ')}` }).default('open'),
  assignee: z.enum(['me', 'any'], { error: 'must be me or any' }).default('any'),
  siteId: textId('a site id').optional(),
  page: textInt({ min: 1, max: 1_000_000, what: 'a page number' }).default(1),
  pageSize: textInt({ min: 1, max: 100, what: 'a page size' }).default(25),
});
export type TicketListQuery = z.input<typeof TicketListQuerySchema>;

export interface PersonRef {
  id: number;
  name: string;
}

export interface TicketFindingView {
  id: number;
  kind: string;
  note: string | null;
  traceId: number;
  eventIndex: number;
  measuredFrom: 'A' | 'B';
  roundTripNs: number;
  distanceM: number;
  uncertaintyM: number;
  windowStartM: number;
  windowEndM: number;
  routePosition: RoutePosition | null;
  routePositionText: string;
  vf: number;
  confirmedBy: PersonRef;
  confirmedAt: string;
  /** The best location of this finding's fault from every reading of it (on a ticket's findings). */
  bestLocation?: BestLocationView | null;
}

export interface TicketSummary {
  id: number;
  title: string;
  status: TicketStatus;
  priority: TicketPriority;
  dueDate: string | null;
  assignee: PersonRef | null;
  site: PersonRef;
  cableRun: PersonRef;
  findingCount: number;
  createdAt: string;
  updatedAt: string;
  /** True when an e-mail about this ticket is failing or has failed. */
  mailTrouble: boolean;
  mine: boolean;
}

export interface TicketEventView {
  id: number;
  kind: 'created' | 'assigned' | 'status' | 'updated' | 'comment' | 'closeout';
  actor: PersonRef;
  at: string;
  fromStatus: TicketStatus | null;
  toStatus: TicketStatus | null;
  comment: string | null;
  /** Field changes: { field: [before, after] }. */
  changes: Record<string, [unknown, unknown]> | null;
}

export interface CloseoutView {
  id: number;
  findingId: number;
  method: 'distance' | 'marker';
  markerLabel: string | null;
  offsetM: number | null;
  fromEnd: 'A' | 'B' | null;
  enteredDistanceM: number | null;
  measuredFrom: 'A' | 'B';
  foundDistanceM: number;
  foundFromAM: number;
  foundChainageM: number;
  locatedDistanceM: number;
  errorM: number;
  errorFraction: number | null;
  roundTripNs: number;
  traceVf: number;
  impliedVf: number | null;
  cause: string;
  workDone: string;
  calibrationId: number | null;
  recordedBy: PersonRef;
  recordedAt: string;
  /** Each method's estimate of this fault, and the best location, against where it was found. */
  methodScores?: MethodScoreView[];
}

export interface TicketRunView {
  id: number;
  name: string;
  endALabel: string;
  endBLabel: string;
  installedLengthM: number;
  cableType: PersonRef;
  markers: Array<{ id: number; label: string; kind: string; chainageM: number; slackM: number; notes: string | null; latitude: number | null; longitude: number | null }>;
}

export interface TicketDetail extends Omit<TicketSummary, 'cableRun'> {
  notes: string | null;
  createdBy: PersonRef;
  siteAddress: string | null;
  accessNotes: string | null;
  cableRun: TicketRunView;
  findings: TicketFindingView[];
  timeline: TicketEventView[];
  closeouts: CloseoutView[];
  mail: MailJobView[];
  /** What the signed-in person may do now. */
  can: { edit: boolean; moves: Array<{ to: TicketStatus; label: string }>; closeOut: boolean; comment: boolean };
}

export interface UnticketedFinding extends TicketFindingView {
  site: PersonRef;
  cableRun: PersonRef;
}

export interface DashboardView {
  generatedAt: string;
  openCount: number;
  /** Of the open tickets, those fixed and waiting for a supervisor's sign-off: work for a desk, not a crew. */
  awaitingSignOff: number;
  /** Open tickets counted by how long they have been open and by priority. */
  byAge: Array<{ label: string; counts: Record<TicketPriority, number> }>;
  /** The longest-open tickets first. */
  oldest: Array<{
    id: number;
    title: string;
    status: TicketStatus;
    priority: TicketPriority;
    ageDays: number;
    dueDate: string | null;
    overdue: boolean;
    site: PersonRef;
    assignee: PersonRef | null;
  }>;
  unticketed: UnticketedFinding[];
  /** Located-vs-found per cable type, from each ticket's latest close-out. */
  accuracy: Array<{
    cableType: PersonRef;
    count: number;
    meanErrorM: number;
    meanAbsErrorM: number;
    meanAbsErrorPercent: number | null;
    meanImpliedVf: number | null;
    libraryVf: number | null;
  }>;
  /** Located-vs-found per location method, for every cable type together and for each one. */
  methodAccuracy: MethodAccuracyRow[];
}
