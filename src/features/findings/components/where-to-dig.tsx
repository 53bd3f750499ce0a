import { describeCrossings, describeRoutePosition, routePosition, type RoutePosition, type RunLike } from '../../../../shared/field/route-position';
import type { ReflectionEvent } from '../../../../shared/schemas/trace-analysis';
import { DigCaution } from '../../../components/ui/safety-caution';
import { formatLength, formatLengthRange, lengthsInText, type LengthUnit } from '../../../lib/format';
import { Term } from '../../../components/ui/term';
import { ONLY_READING_SENTENCE, onlyReadingFromBText } from '../../../../shared/locate/words';

// Kept here for the pages that import it with ReadingAlone; the mail reads the same helper from shared/locate/words.
export { onlyReadingOf } from '../../../../shared/locate/words';

/** Where an event of a trace is on the ground, with the run's markers as they are now. */
export function placeEvent(run: RunLike, end: 'A' | 'B', e: Pick<ReflectionEvent, 'distanceM' | 'windowStartM' | 'windowEndM'>): RoutePosition {
  return routePosition(run, end, e.distanceM, { startM: e.windowStartM, endM: e.windowEndM });
}

/**
 * The route sentence in the reader's unit: from the position kept with a
 * finding when there is one, else from the stored text (written in metres).
 */
export function routeWords(pos: RoutePosition | null | undefined, storedText: string | null | undefined, unit: LengthUnit): { sentence: string; crossing: string | null } {
  if (pos) return { sentence: describeRoutePosition(pos, unit), crossing: describeCrossings(pos, unit) };
  return { sentence: lengthsInText(storedText ?? '', unit), crossing: null };
}

/** The route sentence, and the marker warning when the dig window runs over one (unless `warn` is off). */
export function RouteSentence({
  pos,
  storedText,
  unit,
  testId = 'route-position',
  warn = true,
}: {
  pos: RoutePosition | null | undefined;
  storedText?: string | null;
  unit: LengthUnit;
  testId?: string;
  warn?: boolean;
}) {
  const { sentence, crossing } = routeWords(pos, storedText, unit);
  return (
    <>
      <span data-testid={testId}>{sentence}</span>
      {warn && crossing && (
        <span className="mt-1 block text-base font-semibold text-danger" data-testid="window-crossing">
          {crossing}
        </span>
      )}
    </>
  );
}

/**
 * The fault distance and its two windows in large type: the first thing a
 * crew reads. The cable-length window is electrical (slack included), from
 * the end measured; the dig window is ground distance past a marker.
 */
export function DistanceBlock({
  distanceM,
  windowStartM,
  windowEndM,
  endLabel,
  end,
  unit,
  pos,
  storedText,
}: {
  distanceM: number;
  windowStartM: number;
  windowEndM: number;
  end: 'A' | 'B';
  endLabel: string;
  unit: LengthUnit;
  pos: RoutePosition | null | undefined;
  storedText?: string | null;
}) {
  return (
    <div className="space-y-1">
      <p className="text-sm text-ink-soft">
        Along the cable from end {end} ({endLabel})
      </p>
      <p className="text-4xl font-bold tabular text-ink sm:text-5xl" data-testid="fault-distance">
        {formatLength(distanceM, unit)}
      </p>
      <p className="text-base tabular" data-testid="cable-window">
        <span className="font-semibold">
          <Term k="cableWindow">Cable-length window</Term>:
        </span> {formatLengthRange(windowStartM, windowEndM, unit)} along the cable from end {end}, slack included
      </p>
      <p className="rounded-md bg-copper-light px-3 py-2 text-lg font-semibold text-ink">
        <RouteSentence pos={pos} storedText={storedText} unit={unit} />
      </p>
      <DigCaution className="mt-2" />
    </div>
  );
}

/**
 * One TDR reading's own distance and windows, shown under a best location.
 * Every line says "this reading alone", so the crew never takes its narrower
 * window for the one to dig by. When the readings give a best location
 * (`fused`), the marker warning belongs to its window and is left out here;
 * when they disagree, this reading's own warning stays. Until the best
 * location is on the page (`bestShown` false) it says that one is being
 * worked out, rather than pointing at a headline not there yet. When the
 * best location is this reading alone (`only`), its figures would repeat the
 * headline's word for word: it says so instead, with the distance from the
 * end it was measured at when that is end B (the headline counts from A).
 */
export function ReadingAlone({
  distanceM,
  uncertaintyM,
  windowStartM,
  windowEndM,
  end,
  endLabel,
  unit,
  pos,
  storedText,
  distanceTestId,
  routeTestId = 'route-position',
  fused,
  bestShown = true,
  only = false,
}: {
  distanceM: number;
  uncertaintyM: number;
  windowStartM: number;
  windowEndM: number;
  end: 'A' | 'B';
  endLabel: string;
  unit: LengthUnit;
  pos: RoutePosition | null | undefined;
  storedText?: string | null;
  distanceTestId?: string;
  routeTestId?: string;
  fused: boolean;
  bestShown?: boolean;
  only?: boolean;
}) {
  if (only && fused && bestShown)
    return (
      <div className="space-y-1 text-sm tabular text-ink-soft" data-testid="reading-alone">
        <p className="font-semibold text-ink">{ONLY_READING_SENTENCE}</p>
        {end === 'B' && <p data-testid={distanceTestId}>{onlyReadingFromBText({ distanceM, uncertaintyM, endLabel }, unit)}</p>}
      </div>
    );
  const heading = !fused
    ? 'This reading alone (the readings disagree: check them before digging)'
    : bestShown
      ? 'This reading alone (dig by the best location above)'
      : 'This reading alone (the best location to dig by is being worked out)';
  return (
    <div className="space-y-1 text-sm tabular text-ink-soft" data-testid="reading-alone">
      <p className="font-semibold text-ink">{heading}</p>
      <p data-testid={distanceTestId}>
        {formatLength(distanceM, unit)} along the cable from end {end} ({endLabel}), ± {formatLength(uncertaintyM, unit)} (95 %)
      </p>
      <p>
        Cable-length window of this reading alone: {formatLengthRange(windowStartM, windowEndM, unit)} from end {end}, slack included
      </p>
      <p>
        Along the route, this reading alone: <RouteSentence pos={pos} storedText={storedText} unit={unit} testId={routeTestId} warn={!fused} />
      </p>
    </div>
  );
}
