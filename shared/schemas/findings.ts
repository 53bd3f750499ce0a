import { z } from 'zod';
import { jsonId, optionalNote, textId, textInt } from './input';
import type { RoutePosition } from '../field/route-position';
import type { BestLocationView } from './measurements';
import type { CableEnd } from './traces';
import type { TicketStatus } from '../tickets/status';

export const FINDING_STATUSES = ['confirmed', 'dismissed'] as const;
export type FindingStatus = (typeof FINDING_STATUSES)[number];

export const FINDING_KINDS = [
  'open-conductor',
  'short-circuit',
  'high-resistance',
  'water-ingress',
  'sheath-damage',
  'splice-fault',
  'crush-or-kink',
  'not-a-fault',
  'other',
] as const;
export const FINDING_KIND_LABELS: Record<(typeof FINDING_KINDS)[number], string> = {
  'open-conductor': 'Open conductor',
  'short-circuit': 'Short circuit',
  'high-resistance': 'High-resistance fault',
  'water-ingress': 'Water in the cable',
  'sheath-damage': 'Sheath damage',
  'splice-fault': 'Faulty splice',
  'crush-or-kink': 'Crushed or kinked cable',
  'not-a-fault': 'Not a fault (known feature)',
  other: 'Other',
};

export const FindingInputSchema = z.strictObject({
  traceId: jsonId('must be a trace id'),
  eventIndex: z.number({ error: 'must be an event number' }).int('must be an event number').min(0, 'must be an event number').max(100_000, 'must be an event number'),
  status: z.enum(FINDING_STATUSES, { error: 'must be confirmed or dismissed' }),
  kind: z.enum(FINDING_KINDS, { error: `must be one of ${FINDING_KINDS.join(', ')}` }),
  note: optionalNote(2000),
});
export type FindingInput = z.input<typeof FindingInputSchema>;

export const FINDING_SORTS = ['confirmedAt', 'distanceM', 'status'] as const;

export const FindingListQuerySchema = z.strictObject({
  siteId: textId().optional(),
  cableRunId: textId().optional(),
  traceId: textId().optional(),
  status: z.enum(FINDING_STATUSES).optional(),
  /** Text search in the note, the kind and the route position, and the site and run names. */
  q: z.string().trim().max(100, 'must be at most 100 characters').optional(),
  sort: z.enum(FINDING_SORTS).default('confirmedAt'),
  dir: z.enum(['asc', 'desc']).default('desc'),
  page: textInt({ min: 1, max: 1_000_000, what: 'a page number' }).default(1),
  pageSize: textInt({ min: 1, max: 100, what: 'a page size' }).default(25),
});
export type FindingListQuery = Partial<z.output<typeof FindingListQuerySchema>>;

export const TwoEndedQuerySchema = z.strictObject({
  traceA: textId('a trace id'),
  eventA: textInt({ min: 0, max: 100_000, what: 'an event number' }),
  traceB: textId('a trace id'),
  eventB: textInt({ min: 0, max: 100_000, what: 'an event number' }),
});

export interface FindingView {
  id: number;
  siteId: number;
  siteName: string;
  cableRunId: number;
  cableRunName: string;
  traceId: number;
  traceName: string;
  end: CableEnd;
  endLabel: string;
  eventIndex: number;
  eventType: string;
  kind: string;
  note: string | null;
  roundTripNs: number;
  distanceM: number;
  uncertaintyM: number;
  windowStartM: number;
  windowEndM: number;
  distanceFromAM: number;
  routePosition: RoutePosition | null;
  routePositionText: string;
  status: FindingStatus;
  confirmedBy: { id: number; name: string };
  confirmedAt: string;
  vf: number;
  vfTolerance: number;
  engineVersion: string;
  /** The best location from every reading of this fault; only GET /api/findings/:id fills it in. */
  bestLocation?: BestLocationView | null;
  /** The repair tickets acting on this finding (any not withdrawn); GET /api/findings/:id and the list fill it in. */
  tickets?: Array<{ id: number; title: string; status: TicketStatus }>;
}

export interface TwoEndedView {
  distanceFromAM: number;
  distanceFromBM: number;
  impliedVf: number;
  disagreementAM: number | null;
  disagreementBM: number | null;
  installedLengthM: number;
  traceA: { id: number; eventIndex: number; roundTripNs: number; distanceM: number };
  traceB: { id: number; eventIndex: number; roundTripNs: number; distanceM: number };
  /** The two-ended position on the route, read from end A; the text is the same in metres. */
  routePosition?: RoutePosition;
  routePositionText: string;
}
