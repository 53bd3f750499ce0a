import { MARKER_KIND_LABELS, type MarkerKind } from '../../../../shared/schemas/sites';
import { locationGeoJson, locationGpx, type LocationFileInput } from '../../../../shared/locate/geo-files';
import type { BestLocationView } from '../../../../shared/schemas/measurements';
import { groundText } from '../../../../shared/locate/words';
import { describeRoutePosition } from '../../../../shared/field/route-position';
import type { LengthUnit } from '../../../lib/format';

interface MarkerWithPlace {
  label: string;
  kind: string;
  latitude: number | null;
  longitude: number | null;
}

/** Save text as a file from the page itself: works on the crew sheet without a signal. */
function save(text: string, name: string, type: string) {
  const url = URL.createObjectURL(new Blob([text], { type }));
  const a = document.createElement('a');
  a.href = url;
  a.download = name;
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}

const LINK = 'inline-flex min-h-11 items-center rounded-md border border-rule bg-card px-3 text-sm font-semibold text-teal hover:border-ink-soft';

/**
 * The estimated position on the map: its coordinates, a geo: link that opens
 * the phone's map app, and GeoJSON and GPX files for a GPS receiver. Or, when
 * the route markers carry no coordinates, why there is none.
 */
export function GroundLinks({
  best,
  markers,
  runName,
  fileStem,
  unit,
}: {
  best: BestLocationView;
  markers: MarkerWithPlace[];
  runName: string;
  fileStem: string;
  unit: LengthUnit;
}) {
  const g = best.ground;
  const words = groundText(best, unit);
  if (!g || !words) return best.groundNote ? <p className="text-sm text-mist" data-testid="ground-note">{best.groundNote}</p> : null;
  const input: LocationFileInput = {
    name: `Fault, ${runName}`,
    description: best.routePosition ? describeRoutePosition(best.routePosition, unit) : words.text,
    place: g,
    markers: markers
      .filter((m) => m.latitude !== null && m.longitude !== null)
      .map((m) => ({ label: m.label, description: MARKER_KIND_LABELS[m.kind as MarkerKind] ?? m.kind, latitude: m.latitude!, longitude: m.longitude! })),
  };
  return (
    <div className="space-y-2" data-testid="ground">
      <p className="text-sm">
        <span className="font-semibold">Estimated position: </span>
        <span className="tabular" data-testid="ground-text">{words.text}</span>
      </p>
      {!g.windowComplete && <p className="text-xs text-warn">The window runs past the last marker with coordinates; the map shows it only that far.</p>}
      <div className="flex flex-wrap gap-2 print:hidden">
        <a className={LINK} href={words.uri} data-testid="geo-link">
          Open in the map app
        </a>
        <button type="button" className={LINK} onClick={() => save(locationGeoJson(input), `${fileStem}.geojson`, 'application/geo+json')}>
          GeoJSON file
        </button>
        <button type="button" className={LINK} onClick={() => save(locationGpx(input), `${fileStem}.gpx`, 'application/gpx+xml')}>
          GPX file
        </button>
      </div>
      <p className="text-xs text-mist">
        Estimated from the route markers&rsquo; coordinates, taking the route as straight between them. Mark out on the ground from the markers; locate other utilities before digging.
      </p>
    </div>
  );
}
