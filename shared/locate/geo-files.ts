/**
 * The estimated fault position in the open formats a phone or a GPS receiver
 * reads: a `geo:` URI (RFC 5870), GeoJSON (RFC 7946) and GPX 1.1
 * (topografix.com/GPX/1/1). Coordinates are WGS 84 decimal degrees, written
 * with 6 decimals (about 0.1 m, RFC 7946 §11.2).
 */
import type { GeoPoint, GroundPlace } from './route-geo';

const fixed = (x: number) => {
  const s = x.toFixed(6);
  return s === '-0.000000' ? '0.000000' : s;
};

/**
 * `geo:lat,lon;u=radius` (RFC 5870 §3.3): `u` is the uncertainty in metres;
 * the window's radius, rounded up to a whole metre.
 */
export function geoUri(p: GeoPoint, uncertaintyM?: number): string {
  const u = uncertaintyM !== undefined && Number.isFinite(uncertaintyM) && uncertaintyM > 0 ? `;u=${Math.ceil(uncertaintyM)}` : '';
  return `geo:${fixed(p.latitude)},${fixed(p.longitude)}${u}`;
}

export interface LocationFileInput {
  /** Short name of the place, e.g. "Fault, Feeder HN-3 to Ashby Lane". */
  name: string;
  /** One line saying where it is, in the reader's unit. */
  description: string;
  place: GroundPlace;
  /** Markers with coordinates, to find the way there. */
  markers: Array<{ label: string; description: string; latitude: number; longitude: number }>;
}

const position = (p: GeoPoint) => [Number(fixed(p.longitude)), Number(fixed(p.latitude))];

/** A GeoJSON FeatureCollection: the estimated position, the dig window along the route, and the markers. */
export function locationGeoJson(input: LocationFileInput): string {
  const { place } = input;
  const features = [
    {
      type: 'Feature',
      geometry: { type: 'Point', coordinates: position(place.point) },
      properties: { name: input.name, description: input.description, role: 'estimated-position', radiusM: Math.ceil(place.radiusM) },
    },
    {
      type: 'Feature',
      geometry: { type: 'LineString', coordinates: place.windowPath.map(position) },
      properties: {
        name: `Dig window: ${input.name}`,
        description: place.windowComplete
          ? 'The 95 % window along the route.'
          : 'The 95 % window along the route, as far as the markers with coordinates reach.',
        role: 'dig-window',
      },
    },
    ...input.markers.map((m) => ({
      type: 'Feature',
      geometry: { type: 'Point', coordinates: position(m) },
      properties: { name: m.label, description: m.description, role: 'route-marker' },
    })),
  ];
  return `${JSON.stringify({ type: 'FeatureCollection', features }, null, 2)}\n`;
}

const xml = (s: string) => s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&apos;' })[c]!);

const wpt = (p: GeoPoint, name: string, desc: string) =>
  `  <wpt lat="${fixed(p.latitude)}" lon="${fixed(p.longitude)}">\n    <name>${xml(name)}</name>\n    <desc>${xml(desc)}</desc>\n  </wpt>`;

/** A GPX 1.1 file: way points for the position, the window's ends and the markers; the window as a track. */
export function locationGpx(input: LocationFileInput): string {
  const { place } = input;
  const lines = [
    '<?xml version="1.0" encoding="UTF-8"?>',
    '<gpx version="1.1" creator="Rholog" xmlns="http://www.topografix.com/GPX/1/1">',
    `  <metadata>\n    <name>${xml(input.name)}</name>\n    <desc>${xml(input.description)}</desc>\n  </metadata>`,
    wpt(place.point, input.name, input.description),
    wpt(place.windowStart, 'Dig window start', 'Start of the 95 % window along the route'),
    wpt(place.windowEnd, 'Dig window end', 'End of the 95 % window along the route'),
    ...input.markers.map((m) => wpt(m, m.label, m.description)),
    '  <trk>',
    `    <name>${xml(`Dig window: ${input.name}`)}</name>`,
    '    <trkseg>',
    ...place.windowPath.map((p) => `      <trkpt lat="${fixed(p.latitude)}" lon="${fixed(p.longitude)}"></trkpt>`),
    '    </trkseg>',
    '  </trk>',
    '</gpx>',
  ];
  return `${lines.join('\n')}\n`;
}
