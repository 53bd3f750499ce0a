/**
 * From an electrical distance along the cable to a place on the ground.
 *
 * The TDR measures length of cable. Where cable is coiled at a marker (slack
 * left at a manhole or a splice), that length is in the electrical distance
 * but not on the route, so every coil passed before the fault is taken off:
 *
 *   cable length at which marker i is reached   e_i = c_i + Σ_{j<i} s_j
 *   ground chainage of a point at cable length d = d − Σ (slack of the coils fully passed)
 *
 * and a point inside a coil (e_i ≤ d ≤ e_i + s_i) is at the marker itself.
 * Chainages are measured along the route from end A; installed length is the
 * cable length from A to B, slack included.
 *
 * Two windows, never to be mixed up: the cable-length window is electrical
 * ("along the cable from end B: 76.8–83.9 m"), the dig window is ground
 * distance past a marker ("on the ground 27.3–34.4 m past MH-2"). A position
 * reads from the end the trace was taken at, and names every marker its dig
 * window runs over.
 */
import { MARKER_KIND_LABELS, type MarkerKind } from '../schemas/sites';
import { formatLength, formatLengthRange, type LengthUnit } from '../units/format-length';

export interface MarkerLike {
  label: string;
  kind: MarkerKind;
  chainageM: number;
  slackM: number;
}

export interface RunLike {
  installedLengthM: number;
  endALabel: string;
  endBLabel: string;
  markers: MarkerLike[];
}

export interface RoutePlace {
  kind: 'end' | 'marker';
  /** 'A' or 'B' for an end, the marker's label otherwise. */
  label: string;
  /** What it is, in words: "manhole", "end A". */
  description: string;
  /** For an end, the end's own label ("Substation bay 2"). */
  name: string;
  chainageM: number;
}

export interface RouteCrossing {
  /** The marker the dig window runs over. */
  place: RoutePlace;
  /** Its ground distance past `from`, in the direction of the reading. */
  offsetM: number;
}

/**
 * A point on the route. Distances read in the direction of the reading: for
 * a trace taken at end B, `from` is the last marker (or end B) passed on the
 * way from B, and offsets grow toward end A.
 */
export interface RoutePosition {
  /** Electrical distance from end A that was placed. */
  distanceFromAM: number;
  /** Ground distance along the route from end A. */
  chainageM: number;
  /** The end the reading was taken from; the sentence runs from it. Positions stored before it was kept read from A. */
  measuredFrom?: 'A' | 'B';
  /** The last marker (or the measured end) at or before the point, coming from the measured end. */
  from: RoutePlace;
  /** Ground distance past `from`, toward `toward`. */
  offsetM: number;
  toward: RoutePlace;
  /** Label of the marker whose slack coil holds the point, if any. */
  inSlackAt: string | null;
  /** Dig window as ground offsets past `from` (start may be negative: before the marker). */
  windowStartOffsetM: number;
  windowEndOffsetM: number;
  /** The dig window as chainages from end A (start ≤ end). */
  windowStartChainageM: number;
  windowEndChainageM: number;
  /** Markers other than `from` that lie inside the dig window, nearest first. */
  crossed?: RouteCrossing[];
  /** True when the distance is past the far end of the cable. */
  beyondEnd: boolean;
  /** How far past the far end, in cable length (0 when on the cable). */
  beyondByM?: number;
  /**
   * How far the window's near and far edges lie past the far end of the cable,
   * in cable length (negative: short of it). Only the far edge past it: the
   * fault may be beyond the far end; both: it is. Absent on positions stored
   * before it was kept.
   */
  windowPastFarEndM?: [number, number];
  /** Total slack taken off before the point. */
  slackDeductedM: number;
}

function sorted(markers: MarkerLike[]) {
  return [...markers].sort((a, b) => a.chainageM - b.chainageM);
}

export function totalSlackM(run: Pick<RunLike, 'markers'>): number {
  return run.markers.reduce((s, m) => s + m.slackM, 0);
}

/** Route (ground) length from A to B: the installed cable length less all coiled slack. */
export function routeLengthM(run: Pick<RunLike, 'installedLengthM' | 'markers'>): number {
  return run.installedLengthM - totalSlackM(run);
}

/** Ground chainage of a point `distanceFromAM` metres of cable from end A. */
export function chainageAt(markers: MarkerLike[], distanceFromAM: number): { chainageM: number; inSlackAt: string | null; slackDeductedM: number } {
  let passed = 0;
  for (const m of sorted(markers)) {
    const reach = m.chainageM + passed;
    if (distanceFromAM < reach) break;
    if (distanceFromAM <= reach + m.slackM && m.slackM > 0) {
      return { chainageM: m.chainageM, inSlackAt: m.label, slackDeductedM: distanceFromAM - m.chainageM };
    }
    passed += m.slackM;
  }
  return { chainageM: distanceFromAM - passed, inSlackAt: null, slackDeductedM: passed };
}

/** Cable length from end A to a ground chainage (the inverse of chainageAt, arriving before any coil there). */
export function cableLengthAt(markers: MarkerLike[], chainageM: number): number {
  let passed = 0;
  for (const m of sorted(markers)) {
    if (m.chainageM >= chainageM) break;
    passed += m.slackM;
  }
  return chainageM + passed;
}

/** Electrical distance from end A of a point measured from `end`. */
export function distanceFromA(run: Pick<RunLike, 'installedLengthM'>, end: 'A' | 'B', distanceM: number): number {
  return end === 'A' ? distanceM : run.installedLengthM - distanceM;
}

function endPlace(run: RunLike, end: 'A' | 'B'): RoutePlace {
  return {
    kind: 'end',
    label: end,
    description: `end ${end}`,
    name: end === 'A' ? run.endALabel : run.endBLabel,
    chainageM: end === 'A' ? 0 : routeLengthM(run),
  };
}

function markerPlace(m: MarkerLike): RoutePlace {
  return { kind: 'marker', label: m.label, description: MARKER_KIND_LABELS[m.kind], name: m.label, chainageM: m.chainageM };
}

/**
 * Place an event on the route. `distanceM` and the window are electrical
 * distances from the end the trace was taken at; the position reads from
 * that end too.
 */
export function routePosition(
  run: RunLike,
  end: 'A' | 'B',
  distanceM: number,
  window: { startM: number; endM: number },
): RoutePosition {
  const dA = distanceFromA(run, end, distanceM);
  const wA = [distanceFromA(run, end, window.startM), distanceFromA(run, end, window.endM)].sort((a, b) => a - b);
  const routeLen = routeLengthM(run);
  const place = chainageAt(run.markers, Math.min(Math.max(0, dA), run.installedLengthM));
  const chainageM = Math.min(place.chainageM, routeLen);
  const ws = chainageAt(run.markers, Math.max(0, wA[0])).chainageM;
  const we = Math.min(chainageAt(run.markers, Math.min(Math.max(0, wA[1]), run.installedLengthM)).chainageM, routeLen);

  // Ground distance from the measured end: chainage for A, what is left of the route for B.
  const along = (chainage: number) => (end === 'A' ? chainage : routeLen - chainage);
  const places = [...sorted(run.markers).map(markerPlace), endPlace(run, 'A'), endPlace(run, 'B')].sort((a, b) => along(a.chainageM) - along(b.chainageM));
  const here = along(chainageM);
  let fromIndex = 0;
  if (place.inSlackAt) fromIndex = places.findIndex((p) => p.kind === 'marker' && p.label === place.inSlackAt);
  else for (let i = 0; i < places.length - 1; i++) if (along(places[i].chainageM) <= here) fromIndex = i;
  const from = places[fromIndex];
  const toward = places[Math.min(fromIndex + 1, places.length - 1)];
  const base = along(from.chainageM);
  const [wNear, wFar] = [along(ws), along(we)].sort((a, b) => a - b);
  const crossed = places
    .filter((p) => p.kind === 'marker' && p !== from && along(p.chainageM) > wNear && along(p.chainageM) < wFar)
    .map((p) => ({ place: p, offsetM: along(p.chainageM) - base }))
    .sort((a, b) => Math.abs(a.offsetM) - Math.abs(b.offsetM));
  const beyondByM = Math.max(0, distanceM - run.installedLengthM);
  const [nearM, farM] = [window.startM, window.endM].sort((a, b) => a - b);
  return {
    distanceFromAM: dA,
    chainageM,
    measuredFrom: end,
    from,
    offsetM: here - base,
    toward,
    inSlackAt: place.inSlackAt,
    windowStartOffsetM: wNear - base,
    windowEndOffsetM: wFar - base,
    windowStartChainageM: ws,
    windowEndChainageM: we,
    crossed,
    beyondEnd: beyondByM > 0,
    beyondByM,
    windowPastFarEndM: [nearM - run.installedLengthM, farM - run.installedLengthM],
    slackDeductedM: place.slackDeductedM,
  };
}

function placeName(p: RoutePlace): string {
  return p.kind === 'end' ? `end ${p.label} (${p.name})` : markerPhrase(p.description, p.label);
}

/**
 * A marker named with its kind, "manhole MH-2"; a label that already begins
 * with its kind's word, in any case ("Pole 9", "pole-9"), stands alone rather
 * than "pole Pole 9".
 */
export function markerPhrase(kindWords: string, label: string): string {
  const k = kindWords.trim().toLowerCase();
  const l = label.trim().toLowerCase();
  const saysKind = k !== '' && l.startsWith(k) && !/[\p{L}]/u.test(l.charAt(k.length));
  return saysKind ? label : `${kindWords} ${label}`;
}

/** A marker by its label alone ("MH-2"), an end by its letter ("end B"). */
function shortName(p: RoutePlace): string {
  return p.kind === 'end' ? `end ${p.label}` : p.label;
}

/** Words for a length: "18.4 m", "60.4 ft". */
export type LengthWords = (metres: number) => string;
/**
 * How lengths are written: the reader's unit (the shared formatter, the
 * usual case), or a function for a caller with its own.
 */
export type LengthStyle = LengthUnit | LengthWords;

function styleOf(style: LengthStyle): { len: LengthWords; range: (a: number, b: number) => string } {
  if (typeof style === 'string') return { len: (m) => formatLength(m, style), range: (a, b) => formatLengthRange(a, b, style) };
  return { len: style, range: (a, b) => `${style(a).replace(/\s\S+$/, '')}–${style(b)}` };
}

/** The ground (dig) window, named as such: "on the ground 72.3–87.6 m past MH-2". */
export function describeDigWindow(pos: RoutePosition, style: LengthStyle): string {
  const { len, range } = styleOf(style);
  const at = shortName(pos.from);
  if (pos.windowStartOffsetM >= 0) return `on the ground ${range(pos.windowStartOffsetM, pos.windowEndOffsetM)} past ${at}`;
  return `on the ground from ${len(-pos.windowStartOffsetM)} before ${at} to ${len(pos.windowEndOffsetM)} past it`;
}

/** The far end, seen from the end measured. */
function farEndName(pos: RoutePosition): string {
  const far = pos.measuredFrom === 'B' ? 'A' : 'B';
  return pos.toward.kind === 'end' && pos.toward.label === far ? placeName(pos.toward) : `end ${far}`;
}

/** Whether the window, not the point, runs past the far end: the fault may be beyond it. */
function windowOnlyPastEnd(pos: RoutePosition): boolean {
  const past = pos.windowPastFarEndM;
  return !!past && !pos.beyondEnd && past[1] > 0;
}

/**
 * "The dig window crosses road crossing RC-1, 145.0 m past MH-2 …", and, when
 * the window runs past the far end of the cable, that the fault may be beyond
 * it; null when the window stays between two markers on the cable.
 */
export function describeCrossings(pos: RoutePosition, style: LengthStyle): string | null {
  const crossed = pos.crossed ?? [];
  if (pos.beyondEnd) return null;
  const { len } = styleOf(style);
  const farEnd = windowOnlyPastEnd(pos)
    ? `The window runs ${len(pos.windowPastFarEndM![1])} of cable past the far end, ${farEndName(pos)}: the fault may be beyond the far end of the cable; check the installed length and the velocity factor.`
    : null;
  if (crossed.length === 0) return farEnd;
  const at = shortName(pos.from);
  const each = crossed.map((c) => `${placeName(c.place)} (${len(Math.abs(c.offsetM))} ${c.offsetM >= 0 ? 'past' : 'before'} ${at})`);
  const list = each.length === 1 ? each[0] : `${each.slice(0, -1).join(', ')} and ${each[each.length - 1]}`;
  const markers = `The dig window crosses ${list}: the fault may be on either side of ${crossed.length === 1 ? 'it' : 'them'}.`;
  return farEnd ? `${markers} ${farEnd}` : markers;
}

/**
 * The sentence a crew digs by, e.g.
 * "18.4 m past manhole MH-3 toward pedestal P-7; dig on the ground 17.2–19.6 m past MH-3";
 * between two poles, "… search the span 17.2–19.6 m past P-8".
 * It reads from the end the trace was taken at.
 */
export function describeRoutePosition(pos: RoutePosition, style: LengthStyle): string {
  const { len } = styleOf(style);
  if (pos.beyondEnd) {
    const by = pos.beyondByM ?? pos.distanceFromAM - pos.chainageM - pos.slackDeductedM;
    const past = pos.windowPastFarEndM;
    // Only the point is past the far end, not the whole window: it may be at the far end or beyond it.
    if (past && past[0] <= 0) {
      return `may be beyond the far end of the cable: the reading is ${len(by)} past it, its window from ${len(-past[0])} short of it to ${len(past[1])} past it; check the installed length and the velocity factor`;
    }
    return `beyond the far end of the cable by ${len(by)}: check the installed length and the velocity factor`;
  }
  // Between two poles the cable is in the air: the window is searched along the span, not dug.
  const aerial = pos.from.kind === 'marker' && pos.toward.kind === 'marker' && pos.from.description === 'pole' && pos.toward.description === 'pole';
  const dig = aerial ? `search the span ${describeDigWindow(pos, style).replace(/^on the ground /, '')}` : `dig ${describeDigWindow(pos, style)}`;
  if (pos.inSlackAt) {
    return `in the slack coil at ${placeName(pos.from)} (toward ${placeName(pos.toward)}); ${dig}`;
  }
  return `${len(pos.offsetM)} past ${placeName(pos.from)} toward ${placeName(pos.toward)}; ${dig}`;
}

/** The route sentence followed, when the window runs over a marker, by the sentence that says so. */
export function describeRoute(pos: RoutePosition, style: LengthStyle): string {
  const crossing = describeCrossings(pos, style);
  return crossing ? `${describeRoutePosition(pos, style)}. ${crossing}` : describeRoutePosition(pos, style);
}

/** Metres in the shared precision, for text stored with a finding. */
export function metresText(m: number): string {
  return formatLength(m, 'm');
}
