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
 */
import { MARKER_KIND_LABELS, type MarkerKind } from '../schemas/sites';

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

export interface RoutePosition {
  /** Electrical distance from end A that was placed. */
  distanceFromAM: number;
  /** Ground distance along the route from end A. */
  chainageM: number;
  /** The last marker (or end A) at or before the point. */
  from: RoutePlace;
  /** Ground distance past `from`, toward `toward`. */
  offsetM: number;
  toward: RoutePlace;
  /** Label of the marker whose slack coil holds the point, if any. */
  inSlackAt: string | null;
  /** Dig window as ground offsets past `from` (start may be negative: before the marker). */
  windowStartOffsetM: number;
  windowEndOffsetM: number;
  windowStartChainageM: number;
  windowEndChainageM: number;
  /** True when the distance is past the far end of the cable. */
  beyondEnd: boolean;
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
 * distances from the end the trace was taken at.
 */
export function routePosition(
  run: RunLike,
  end: 'A' | 'B',
  distanceM: number,
  window: { startM: number; endM: number },
): RoutePosition {
  const dA = distanceFromA(run, end, distanceM);
  const wA = [distanceFromA(run, end, window.startM), distanceFromA(run, end, window.endM)].sort((a, b) => a - b);
  const place = chainageAt(run.markers, Math.max(0, dA));
  const markers = sorted(run.markers);
  const routeLen = routeLengthM(run);
  const chainageM = Math.min(place.chainageM, routeLen);
  let from = endPlace(run, 'A');
  let toward = endPlace(run, 'B');
  for (const m of markers) {
    if (m.chainageM <= chainageM) from = markerPlace(m);
    else {
      toward = markerPlace(m);
      break;
    }
  }
  if (place.inSlackAt) {
    const m = markers.find((x) => x.label === place.inSlackAt)!;
    from = markerPlace(m);
    const next = markers.find((x) => x.chainageM > m.chainageM);
    toward = next ? markerPlace(next) : endPlace(run, 'B');
  }
  const ws = chainageAt(run.markers, Math.max(0, wA[0])).chainageM;
  const we = Math.min(chainageAt(run.markers, Math.max(0, wA[1])).chainageM, routeLen);
  return {
    distanceFromAM: dA,
    chainageM,
    from,
    offsetM: chainageM - from.chainageM,
    toward,
    inSlackAt: place.inSlackAt,
    windowStartOffsetM: ws - from.chainageM,
    windowEndOffsetM: we - from.chainageM,
    windowStartChainageM: ws,
    windowEndChainageM: we,
    beyondEnd: dA > run.installedLengthM,
    slackDeductedM: place.slackDeductedM,
  };
}

function placeName(p: RoutePlace): string {
  return p.kind === 'end' ? `end ${p.label} (${p.name})` : `${p.description} ${p.label}`;
}

/**
 * The sentence a crew digs by, e.g.
 * "18.4 m past manhole MH-3 toward pedestal P-7, dig window 17.2–19.6 m".
 * `fmt` turns metres into the reader's unit ("18.4 m", "60.4 ft").
 */
export function describeRoutePosition(pos: RoutePosition, fmt: (metres: number) => string): string {
  if (pos.beyondEnd) {
    return `beyond the far end of the cable by ${fmt(pos.distanceFromAM - pos.chainageM - pos.slackDeductedM)}: check the installed length and the velocity factor`;
  }
  const window =
    pos.windowStartOffsetM >= 0
      ? `dig window ${fmt(pos.windowStartOffsetM).replace(/ [a-z]+$/, '')}–${fmt(pos.windowEndOffsetM)}`
      : `dig window from ${fmt(-pos.windowStartOffsetM)} before to ${fmt(pos.windowEndOffsetM)} past it`;
  if (pos.inSlackAt) {
    return `in the slack coil at ${placeName(pos.from)} (toward ${placeName(pos.toward)}), ${window}`;
  }
  return `${fmt(pos.offsetM)} past ${placeName(pos.from)} toward ${placeName(pos.toward)}, ${window}`;
}

/** Metres with one decimal, for stored text. */
export function metresText(m: number): string {
  return `${(Math.round(m * 10) / 10).toFixed(1)} m`;
}
