import { z } from 'zod';
import { foldedNameFits, jsonId, lengthM, MAX_LENGTH_M, multiLine, oneLine, textId, textInt } from './input';

const text = (max: number) => z.string().trim().max(max, `must be at most ${max} characters`);
const optionalText = (max: number) =>
  text(max)
    .nullish()
    .transform((v) => (v ? v : null));
const id = jsonId();

export const MARKER_KINDS = ['pole', 'manhole', 'handhole', 'splice', 'pedestal', 'road-crossing', 'cabinet', 'other'] as const;
export type MarkerKind = (typeof MARKER_KINDS)[number];
export const MARKER_KIND_LABELS: Record<MarkerKind, string> = {
  pole: 'pole',
  manhole: 'manhole',
  handhole: 'handhole',
  splice: 'splice',
  pedestal: 'pedestal',
  'road-crossing': 'road crossing',
  cabinet: 'cabinet',
  other: 'marker',
};

export const SiteInputSchema = z.object({
  name: foldedNameFits(oneLine(text(120).min(1, 'is required'))),
  address: oneLine(optionalText(300)),
  latitude: z
    .number({ error: 'must be a number of degrees, or null' })
    .min(-90, 'must be between -90 and 90')
    .max(90, 'must be between -90 and 90')
    .nullish()
    .transform((v) => v ?? null),
  longitude: z
    .number({ error: 'must be a number of degrees, or null' })
    .min(-180, 'must be between -180 and 180')
    .max(180, 'must be between -180 and 180')
    .nullish()
    .transform((v) => v ?? null),
  accessNotes: multiLine(optionalText(4000)),
  supervisorIds: z.array(id, { error: 'must be a list of user ids' }).max(20, 'at most 20 supervisors').default([]),
});
export type SiteInput = z.input<typeof SiteInputSchema>;

/**
 * What an edit form loaded, sent back with the save as `basedOn`: a field someone else changed meanwhile is kept
 * if the form left it as it was, and the save is refused (409 changed_meanwhile) if the form changed it too.
 */
const snapshotText = z.string({ error: 'must be text or null' }).max(4000, 'must be at most 4000 characters').nullable();
const snapshotNumber = z.number({ error: 'must be a number or null' }).nullable();

export const SiteUpdateSchema = SiteInputSchema.extend({
  basedOn: z
    .strictObject({
      name: snapshotText,
      address: snapshotText,
      latitude: snapshotNumber,
      longitude: snapshotNumber,
      accessNotes: snapshotText,
      supervisorIds: z.array(id, { error: 'must be a list of user ids' }).max(100, 'at most 100 supervisors'),
    })
    .partial()
    .optional(),
});
export type SiteUpdate = z.input<typeof SiteUpdateSchema>;

export const SiteListQuerySchema = z.strictObject({
  q: z.string().trim().max(100).optional(),
  page: textInt({ min: 1, max: 1_000_000, what: 'a page number' }).default(1),
  pageSize: textInt({ min: 1, max: 100, what: 'a page size' }).default(25),
});

export const RouteMarkerInputSchema = z.object({
  label: oneLine(text(60).min(1, 'is required')),
  kind: z.enum(MARKER_KINDS, { error: `must be one of ${MARKER_KINDS.join(', ')}` }),
  chainageM: lengthM('chainage'),
  slackM: lengthM('slack', { max: 10_000 }).default(0),
  notes: multiLine(optionalText(1000)),
  /** WGS 84 decimal degrees, optional; both or neither (checked with the run's other markers). */
  latitude: z
    .number({ error: 'must be a number of degrees (WGS 84), or left empty' })
    .min(-90, 'must be between -90 and 90 degrees')
    .max(90, 'must be between -90 and 90 degrees')
    .nullish()
    .transform((v) => v ?? null),
  longitude: z
    .number({ error: 'must be a number of degrees (WGS 84), or left empty' })
    .min(-180, 'must be between -180 and 180 degrees')
    .max(180, 'must be between -180 and 180 degrees')
    .nullish()
    .transform((v) => v ?? null),
});
export type RouteMarkerInput = z.input<typeof RouteMarkerInputSchema>;

export const CableRunInputSchema = z.object({
  siteId: id,
  name: foldedNameFits(oneLine(text(120).min(1, 'is required'))),
  cableTypeId: id,
  endALabel: oneLine(text(120).min(1, 'is required')),
  endBLabel: oneLine(text(120).min(1, 'is required')),
  installedLengthM: lengthM('installed length', { positive: true, max: MAX_LENGTH_M }),
  notes: multiLine(optionalText(4000)),
});
export type CableRunInput = z.input<typeof CableRunInputSchema>;

/** As for sites: `basedOn` is the run as the edit form loaded it. */
export const CableRunUpdateSchema = CableRunInputSchema.omit({ siteId: true }).extend({
  basedOn: z
    .strictObject({
      name: snapshotText,
      cableTypeId: id,
      endALabel: snapshotText,
      endBLabel: snapshotText,
      installedLengthM: snapshotNumber,
      notes: snapshotText,
    })
    .partial()
    .optional(),
});
export type CableRunUpdate = z.input<typeof CableRunUpdateSchema>;

/** A marker as the editor loaded it (its id, if sent, is not compared). */
const MarkerSnapshotSchema = z.object({
  label: snapshotText,
  kind: snapshotText,
  chainageM: snapshotNumber,
  slackM: snapshotNumber,
  notes: snapshotText.optional(),
  latitude: snapshotNumber.optional(),
  longitude: snapshotNumber.optional(),
});

export const MarkersInputSchema = z.object({
  markers: z.array(RouteMarkerInputSchema).max(500, 'at most 500 markers per run'),
  /** The marker list as the editor loaded it: the save is refused (409 changed_meanwhile) if someone else saved another list meanwhile. */
  basedOn: z.strictObject({ markers: z.array(MarkerSnapshotSchema).max(500, 'at most 500 markers per run') }).optional(),
});

export const CableRunListQuerySchema = z.strictObject({
  siteId: textId().optional(),
  q: z.string().trim().max(100).optional(),
  page: textInt({ min: 1, max: 1_000_000, what: 'a page number' }).default(1),
  pageSize: textInt({ min: 1, max: 200, what: 'a page size' }).default(50),
});

export interface SupervisorSummary {
  id: number;
  name: string;
  email: string;
  /**
   * Still an active supervisor or administrator. A site keeps its link to someone deactivated or moved to
   * another role (false) until a planner takes them off; no one new can be added who is not.
   */
  active: boolean;
}

export interface SiteSummary {
  id: number;
  name: string;
  address: string | null;
  latitude: number | null;
  longitude: number | null;
  accessNotes: string | null;
  supervisors: SupervisorSummary[];
  cableRunCount: number;
  openFindingCount: number;
}

export interface RouteMarkerView {
  id: number;
  label: string;
  kind: MarkerKind;
  chainageM: number;
  slackM: number;
  notes: string | null;
  latitude: number | null;
  longitude: number | null;
}

export interface CableRunView {
  id: number;
  siteId: number;
  siteName: string;
  name: string;
  cableTypeId: number;
  cableType: { id: number; name: string; vf: number; vfTolerance: number; z0Ohm: number };
  endALabel: string;
  endBLabel: string;
  installedLengthM: number;
  notes: string | null;
  markers: RouteMarkerView[];
  referenceTraceIds: { A: number | null; B: number | null };
}
