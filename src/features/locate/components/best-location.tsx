import { Link } from 'react-router-dom';
import type { BestLocationView, LocationMethodView } from '../../../../shared/schemas/measurements';
import { methodShareText, plainVerdict, setAsideFigureText, setAsideText, weightText } from '../../../../shared/locate/words';
import { Notice } from '../../../components/ui/notice';
import { DigCaution } from '../../../components/ui/safety-caution';
import { formatLength, formatLengthRange, lengthsInText, type LengthUnit } from '../../../lib/format';
import { describeCrossings, describeRoutePosition } from '../../../../shared/field/route-position';
import { GroundLinks } from './ground-links';
import { RouteStrip, type StripRun } from './route-strip';
import { Term } from '../../../components/ui/term';

export interface LocationRun extends StripRun {
  name: string;
  markers: Array<StripRun['markers'][number] & { latitude: number | null; longitude: number | null }>;
}

/** Where a method's reading is kept: its finding, or the reading's number. */
function sourceLink(m: LocationMethodView, findingLink?: (id: number) => string) {
  if (m.findingId !== null && findingLink && m.measurementId === null && m.method === 'tdr-single-ended')
    return (
      <Link className="text-teal underline" to={findingLink(m.findingId)}>
        {m.label}
      </Link>
    );
  return m.label;
}

/**
 * The best location of a fault, in large type: the first thing a crew reads.
 * Its 95 % window and standard uncertainty, where to dig along the route, the
 * readings it rests on and whether they agree; the route strip and the map
 * position when there are markers to draw them from.
 */
export function BestLocationHeadline({
  best,
  run,
  unit,
  strip = true,
  fileStem = 'fault-location',
}: {
  best: BestLocationView;
  run: LocationRun;
  unit: LengthUnit;
  strip?: boolean;
  fileStem?: string;
}) {
  const used = best.methods.filter((m) => m.used);
  return (
    <div className="space-y-3" data-testid="best-location">
      <p className="text-sm text-ink-soft">Best location from every reading of the fault, along the cable from end A ({run.endALabel})</p>
      {best.distanceFromAM !== null ? (
        <>
          <p className="text-4xl font-bold tabular text-ink sm:text-5xl" data-testid="best-distance">
            {formatLength(best.distanceFromAM, unit)}
          </p>
          <p className="text-base tabular" data-testid="best-window">
            <span className="font-semibold">
              <Term k="window95">95 % window</Term>:
            </span> {formatLengthRange(best.windowStartM!, best.windowEndM!, unit)} along the cable from end A
            <span className="text-ink-soft">
              {' · '}
              <Term k="standardUncertainty">standard uncertainty</Term> <span className="whitespace-nowrap">± {formatLength(best.standardUncertaintyM, unit)}</span></span>
          </p>
          {best.routePosition && (
            <p className="rounded-md bg-copper-light px-3 py-2 text-lg font-semibold text-ink">
              <span data-testid="best-route-position">{describeRoutePosition(best.routePosition, unit)}</span>
              {describeCrossings(best.routePosition, unit) && (
                <span className="mt-1 block text-base font-semibold text-danger">{describeCrossings(best.routePosition, unit)}</span>
              )}
            </p>
          )}
          <DigCaution />
          <p className="text-sm" data-testid="best-methods">
            {/* Each reading's share of the location (its weight), named as such: a bare "100 %" read as a confidence. */}
            <span className="font-semibold">Made from, with each reading's share: </span>
            {used.map(methodShareText).join(' · ')}
          </p>
        </>
      ) : (
        <Notice tone="danger" title="No best location: the readings disagree">
          <p>{plainVerdict(lengthsInText(best.verdict, unit))}</p>
        </Notice>
      )}
      {best.distanceFromAM !== null && (
        <p className={`text-sm ${best.consistent ? 'text-ok' : 'font-semibold text-danger'}`} data-testid="best-verdict">
          {plainVerdict(lengthsInText(best.verdict, unit))}
        </p>
      )}
      {!best.consistent && (
        <div className="rounded-md border-l-4 border-danger bg-danger-light px-4 py-3 text-sm" data-testid="best-checks">
          {best.outlier && (
            <div data-testid="best-set-aside">
              <p className="font-semibold">Set aside: {setAsideText(best.outlier, unit)}</p>
              {/* The statistic stays for those who check it, folded away from the crew's reading. */}
              <details className="text-xs text-ink-soft">
                <summary className="inline-flex min-h-11 cursor-pointer items-center font-semibold text-teal">The figure behind it</summary>
                <p data-testid="best-set-aside-figure">{setAsideFigureText(best.outlier)}</p>
              </details>
            </div>
          )}
          <p className="mt-1 font-semibold">What to check:</p>
          <ul className="list-disc pl-5">
            {best.checks.map((c) => (
              <li key={c}>{lengthsInText(c, unit)}</li>
            ))}
          </ul>
        </div>
      )}
      {strip && best.routePosition && <RouteStrip run={run} pos={best.routePosition} unit={unit} />}
      {best.distanceFromAM !== null && <GroundLinks best={best} markers={run.markers.map((m) => ({ ...m, kind: m.kind }))} runName={run.name} fileStem={fileStem} unit={unit} />}
    </div>
  );
}

/** Every reading of the fault: what it says, how sure it is, and whether it went into the best location. */
export function LocationMethods({ best, unit, findingLink }: { best: BestLocationView; unit: LengthUnit; findingLink?: (id: number) => string }) {
  return (
    <div className="space-y-3">
      <ul className="space-y-2 sm:hidden" data-testid="location-methods-list">
        {best.methods.map((m) => (
          <li key={m.id} className={`rounded-md border border-rule p-2 text-sm tabular ${m.used ? '' : 'text-ink-soft'}`}>
            <p className="font-semibold">{sourceLink(m, findingLink)}</p>
            <p>
              {formatLength(m.distanceFromEndM, unit)} from end {m.fromEnd} · standard uncertainty <span className="whitespace-nowrap">± {formatLength(m.standardUncertaintyM, unit)}</span>
              {m.weight !== null && ` · weight ${weightText(m.weight)}`}
            </p>
            <p className="text-xs">
              95 % window {formatLengthRange(m.windowStartM, m.windowEndM, unit)} from A · {m.used ? 'used' : 'not used'}
              {m.note ? ` · ${lengthsInText(m.note, unit)}` : ''}
            </p>
          </li>
        ))}
      </ul>
      <div className="hidden overflow-x-auto sm:block">
        <table className="w-full text-left text-sm tabular" data-testid="location-methods">
          <thead className="text-xs uppercase text-mist">
            <tr>
              <th className="py-2">Reading</th>
              <th className="whitespace-nowrap text-right">From its end</th>
              <th className="whitespace-nowrap text-right">95 % window (A)</th>
              <th className="whitespace-nowrap text-right">Std. unc.</th>
              <th className="text-right">Weight</th>
            </tr>
          </thead>
          <tbody>
            {best.methods.map((m) => (
              <tr key={m.id} className={`border-t border-rule align-top ${m.used ? '' : 'text-ink-soft'}`}>
                <td className="py-2">
                  <span className="font-semibold">{sourceLink(m, findingLink)}</span>
                  <span className="block text-xs">
                    {m.used ? 'used' : 'not used'}
                    {m.note ? ` · ${lengthsInText(m.note, unit)}` : ''}
                  </span>
                </td>
                <td className="whitespace-nowrap pl-2 text-right">
                  {formatLength(m.distanceFromEndM, unit)} from {m.fromEnd}
                </td>
                <td className="whitespace-nowrap pl-2 text-right">{formatLengthRange(m.windowStartM, m.windowEndM, unit)}</td>
                <td className="whitespace-nowrap pl-2 text-right">± {formatLength(m.standardUncertaintyM, unit)}</td>
                <td className="text-right">{m.weight === null ? '—' : weightText(m.weight)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {best.test && (
        <p className="text-xs text-mist" data-testid="agreement-test">
          Agreement test: <Term k="chiSquare">χ²</Term> = {best.test.chiSquare.toFixed(2)} on {best.test.degreesOfFreedom} degree{best.test.degreesOfFreedom === 1 ? '' : 's'} of freedom (95 % limit{' '}
          {best.test.limit95.toFixed(2)}). Readings are weighted by the inverse of their variance; errors they share (the installed length, one velocity factor) are counted once.
        </p>
      )}
      {best.excluded.length > 0 && (
        <div className="text-sm" data-testid="location-excluded">
          <p className="font-semibold">Readings that give no location on this run</p>
          <ul className="list-disc pl-5">
            {best.excluded.map((e) => (
              <li key={`${e.label}-${e.findingId}-${e.measurementId}`}>
                {e.label}: {lengthsInText(e.reason, unit)}
              </li>
            ))}
          </ul>
        </div>
      )}
      {best.assumptions.length > 0 && (
        <div className="text-xs text-ink-soft" data-testid="location-assumptions">
          <p className="font-semibold">Assumed</p>
          <ul className="list-disc pl-5">
            {best.assumptions.map((a) => (
              <li key={a}>{lengthsInText(a, unit)}</li>
            ))}
          </ul>
        </div>
      )}
    </div>
  );
}
