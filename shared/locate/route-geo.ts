/**
 * From a place on the route (ground chainage from end A) to an estimated
 * coordinate, using the route markers that carry one.
 *
 * Markers with a coordinate are the anchors. Between two neighbouring anchors
 * the route is taken as running straight, so a chainage a fraction t of the
 * way from one anchor's chainage to the next is put a fraction t of the way
 * along the great circle between their coordinates (linear referencing; the
 * usual way a chainage is turned into a position between two surveyed points).
 * Outside the first and last anchor nothing is estimated: a crew that wants
 * positions near an end adds a marker at the end (chainage 0, or the route
 * length) with its coordinate.
 *
 * Distances on the ground use the haversine formula on a sphere of the mean
 * Earth radius R1 = 6 371 008.8 m (H. Moritz, "Geodetic Reference System
 * 1980", Bulletin Géodésique 54 (1980) 395; R. W. Sinnott, "Virtues of the
 * Haversine", Sky & Telescope 68 (1984) 159). Points between two coordinates
 * use the intermediate-point formula on the great circle (E. Williams,
 * Aviation Formulary, "Intermediate points on a great circle"). Over the few
 * hundred metres between markers the sphere differs from the WGS 84 ellipsoid
 * by well under 0.5 %, far inside a dig window.
 */

export const EARTH_MEAN_RADIUS_M = 6_371_008.8;

export interface GeoPoint {
  latitude: number;
  longitude: number;
}

export interface MarkerOnMap {
  label: string;
  chainageM: number;
  latitude: number | null;
  longitude: number | null;
}

const rad = (deg: number) => (deg * Math.PI) / 180;
const deg = (r: number) => (r * 180) / Math.PI;

/** Ground distance between two coordinates, metres (haversine on the mean sphere). */
export function groundDistanceM(a: GeoPoint, b: GeoPoint): number {
  const dLat = rad(b.latitude - a.latitude);
  const dLon = rad(b.longitude - a.longitude);
  const h = Math.sin(dLat / 2) ** 2 + Math.cos(rad(a.latitude)) * Math.cos(rad(b.latitude)) * Math.sin(dLon / 2) ** 2;
  return 2 * EARTH_MEAN_RADIUS_M * Math.asin(Math.min(1, Math.sqrt(h)));
}

/** The point a fraction `f` (0 … 1) of the way from `a` to `b` along the great circle. */
export function pointBetween(a: GeoPoint, b: GeoPoint, f: number): GeoPoint {
  const d = groundDistanceM(a, b) / EARTH_MEAN_RADIUS_M;
  if (d < 1e-12) return { latitude: a.latitude, longitude: a.longitude };
  const wa = Math.sin((1 - f) * d) / Math.sin(d);
  const wb = Math.sin(f * d) / Math.sin(d);
  const [p1, l1, p2, l2] = [rad(a.latitude), rad(a.longitude), rad(b.latitude), rad(b.longitude)];
  const x = wa * Math.cos(p1) * Math.cos(l1) + wb * Math.cos(p2) * Math.cos(l2);
  const y = wa * Math.cos(p1) * Math.sin(l1) + wb * Math.cos(p2) * Math.sin(l2);
  const z = wa * Math.sin(p1) + wb * Math.sin(p2);
  return { latitude: deg(Math.atan2(z, Math.hypot(x, y))), longitude: deg(Math.atan2(y, x)) };
}

interface Anchor extends GeoPoint {
  label: string;
  chainageM: number;
}

/** Markers with a coordinate, in route order. */
export function anchorsOf(markers: MarkerOnMap[]): Anchor[] {
  return markers
    .filter((m) => m.latitude !== null && m.longitude !== null)
    .map((m) => ({ label: m.label, chainageM: m.chainageM, latitude: m.latitude!, longitude: m.longitude! }))
    .sort((a, b) => a.chainageM - b.chainageM);
}

export interface PointOnRoute extends GeoPoint {
  /** The anchors the point lies between (the same label twice when it is at an anchor). */
  fromLabel: string;
  toLabel: string;
}

/** The estimated coordinate of a ground chainage, or null when it is outside the anchored stretch. */
export function pointAtChainage(markers: MarkerOnMap[], chainageM: number): PointOnRoute | null {
  const anchors = anchorsOf(markers);
  if (anchors.length === 0 || !Number.isFinite(chainageM)) return null;
  for (let i = 0; i < anchors.length; i++) {
    const a = anchors[i];
    if (Math.abs(chainageM - a.chainageM) < 1e-9) return { latitude: a.latitude, longitude: a.longitude, fromLabel: a.label, toLabel: a.label };
    const b = anchors[i + 1];
    if (b && chainageM > a.chainageM && chainageM < b.chainageM) {
      const p = pointBetween(a, b, (chainageM - a.chainageM) / (b.chainageM - a.chainageM));
      return { ...p, fromLabel: a.label, toLabel: b.label };
    }
  }
  return null;
}

export interface GroundPlace {
  /** The estimated coordinate of the best location. */
  point: GeoPoint;
  /** The anchors it lies between. */
  fromLabel: string;
  toLabel: string;
  /** The 95 % window's ends on the ground, as far as the anchors reach. */
  windowStart: GeoPoint;
  windowEnd: GeoPoint;
  /** The window along the route: its start, every anchor inside it, its end. */
  windowPath: GeoPoint[];
  /** False when the window runs past the first or last anchor and is shown only as far as the anchors reach. */
  windowComplete: boolean;
  /** The larger ground distance from the point to a window end, metres: the radius that holds the window. */
  radiusM: number;
}

/**
 * The estimated coordinate of a place on the route and its window, from
 * ground chainages (slack already taken off). Null when the point itself is
 * not between two anchors.
 */
export function placeOnGround(
  markers: MarkerOnMap[],
  at: { chainageM: number; windowStartChainageM: number; windowEndChainageM: number },
): GroundPlace | null {
  const point = pointAtChainage(markers, at.chainageM);
  if (!point) return null;
  const anchors = anchorsOf(markers);
  const first = anchors[0].chainageM;
  const last = anchors[anchors.length - 1].chainageM;
  const lo = Math.max(first, Math.min(at.windowStartChainageM, at.chainageM));
  const hi = Math.min(last, Math.max(at.windowEndChainageM, at.chainageM));
  const windowStart = pointAtChainage(markers, lo)!;
  const windowEnd = pointAtChainage(markers, hi)!;
  const inside = anchors.filter((a) => a.chainageM > lo && a.chainageM < hi);
  const strip = (p: GeoPoint): GeoPoint => ({ latitude: p.latitude, longitude: p.longitude });
  return {
    point: strip(point),
    fromLabel: point.fromLabel,
    toLabel: point.toLabel,
    windowStart: strip(windowStart),
    windowEnd: strip(windowEnd),
    windowPath: [strip(windowStart), ...inside.map(strip), strip(windowEnd)],
    windowComplete: at.windowStartChainageM >= first - 1e-9 && at.windowEndChainageM <= last + 1e-9,
    radiusM: Math.max(groundDistanceM(point, windowStart), groundDistanceM(point, windowEnd)),
  };
}

/**
 * A handheld satellite receiver's position is good to a few metres; two
 * markers may read up to this much further apart in a straight line than the
 * route between them before their coordinates are refused (common practice
 * for consumer GNSS, about 5–10 m each).
 */
export const COORDINATE_TOLERANCE_M = 20;

export interface CoordinateProblem {
  /** Index of the marker in the list as given. */
  index: number;
  field: 'latitude' | 'longitude';
  message: string;
}

/**
 * Coordinates a route cannot have: one of the pair missing, out of range,
 * the unset position 0, 0, or two markers further apart in a straight line
 * than along the route between them (the route can never be shorter than the
 * straight line).
 */
export function coordinateProblems(
  markers: Array<{ label: string; chainageM: number; latitude?: number | null; longitude?: number | null }>,
): CoordinateProblem[] {
  const problems: CoordinateProblem[] = [];
  markers.forEach((m, index) => {
    const hasLat = m.latitude !== null && m.latitude !== undefined;
    const hasLon = m.longitude !== null && m.longitude !== undefined;
    if (hasLat !== hasLon) {
      problems.push({
        index,
        field: hasLat ? 'longitude' : 'latitude',
        message: `marker ${m.label} has a ${hasLat ? 'latitude' : 'longitude'} but no ${hasLat ? 'longitude' : 'latitude'}: give both or neither`,
      });
    } else if (hasLat && m.latitude === 0 && m.longitude === 0) {
      problems.push({ index, field: 'latitude', message: `marker ${m.label} is at 0, 0, which is where an unset position reads: give its real coordinates or none` });
    }
  });
  if (problems.length) return problems;
  const placed = markers
    .map((m, index) => ({ ...m, index }))
    .filter((m) => m.latitude !== null && m.latitude !== undefined && m.longitude !== null && m.longitude !== undefined)
    .sort((a, b) => a.chainageM - b.chainageM);
  for (let i = 1; i < placed.length; i++) {
    const a = placed[i - 1];
    const b = placed[i];
    const straight = groundDistanceM(
      { latitude: a.latitude!, longitude: a.longitude! },
      { latitude: b.latitude!, longitude: b.longitude! },
    );
    const along = b.chainageM - a.chainageM;
    if (straight > along + COORDINATE_TOLERANCE_M) {
      problems.push({
        index: b.index,
        field: 'latitude',
        message:
          `marker ${b.label} is ${Math.round(straight)} m from ${a.label} in a straight line but only ${along.toFixed(1)} m ` +
          `further along the route: check its coordinates or its chainage`,
      });
    }
  }
  return problems;
}
