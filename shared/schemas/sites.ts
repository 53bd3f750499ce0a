import { z } from 'zod';

const text = (max: number) => z.string().trim().max(max, `must be at most ${max} characters`);
const optionalText = (max: number) =>
  text(max)
    .nullish()
    .transform((v) => (v ? v : null));
const id = z.coerce.number({ error: 'must be a number' }).int('must be a whole number').positive('must be a positive id');
const metres = (what: string) =>
  z.coerce.number({ error: `${what} must be a number` }).refine(Number.isFinite, `${what} must be a finite number`);

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
  name: text(120).min(1, 'is required'),
  address: optionalText(300),
  latitude: z.coerce.number().min(-90, 'must be between -90 and 90').max(90, 'must be between -90 and 90').nullish().transform((v) => v ?? null),
  longitude: z.coerce
    .number()
    .min(-180, 'must be between -180 and 180')
    .max(180, 'must be between -180 and 180')
    .nullish()
    .transform((v) => v ?? null),
  accessNotes: optionalText(4000),
  supervisorIds: z.array(id).max(20).default([]),
});
export type SiteInput = z.input<typeof SiteInputSchema>;

export const SiteListQuerySchema = z.object({
  q: z.string().trim().max(100).optional(),
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(100).default(25),
});

export const RouteMarkerInputSchema = z.object({
  label: text(60).min(1, 'is required'),
  kind: z.enum(MARKER_KINDS, { error: `must be one of ${MARKER_KINDS.join(', ')}` }),
  chainageM: metres('chainage').refine((v) => v >= 0, 'chainage must be zero or more'),
  slackM: metres('slack').refine((v) => v >= 0, 'slack must be zero or more').default(0),
  notes: optionalText(1000),
});
export type RouteMarkerInput = z.input<typeof RouteMarkerInputSchema>;

export const CableRunInputSchema = z.object({
  siteId: id,
  name: text(120).min(1, 'is required'),
  cableTypeId: id,
  endALabel: text(120).min(1, 'is required'),
  endBLabel: text(120).min(1, 'is required'),
  installedLengthM: metres('installed length').refine((v) => v > 0, 'installed length must be more than zero'),
  notes: optionalText(4000),
});
export type CableRunInput = z.input<typeof CableRunInputSchema>;

export const CableRunUpdateSchema = CableRunInputSchema.omit({ siteId: true });

export const MarkersInputSchema = z.object({
  markers: z.array(RouteMarkerInputSchema).max(500, 'at most 500 markers per run'),
});

export const CableRunListQuerySchema = z.object({
  siteId: id.optional(),
  q: z.string().trim().max(100).optional(),
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(50),
});

export interface SupervisorSummary {
  id: number;
  name: string;
  email: string;
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
