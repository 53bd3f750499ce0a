import { describeRoutePosition, routePosition, type RunLike } from '../../../../shared/field/route-position';
import type { ReflectionEvent } from '../../../../shared/schemas/trace-analysis';
import { formatLength, type LengthUnit } from '../../../lib/format';

/** The route position sentence in the reader's unit. */
export function whereToDig(run: RunLike, end: 'A' | 'B', e: Pick<ReflectionEvent, 'distanceM' | 'windowStartM' | 'windowEndM'>, unit: LengthUnit) {
  const pos = routePosition(run, end, e.distanceM, { startM: e.windowStartM, endM: e.windowEndM });
  return { pos, text: describeRoutePosition(pos, (m) => formatLength(m, unit, 1)) };
}

/** The fault distance and dig window in large type: the first thing a crew reads. */
export function DistanceBlock({
  distanceM,
  windowStartM,
  windowEndM,
  endLabel,
  end,
  unit,
  routeText,
}: {
  distanceM: number;
  windowStartM: number;
  windowEndM: number;
  end: 'A' | 'B';
  endLabel: string;
  unit: LengthUnit;
  routeText: string;
}) {
  return (
    <div className="space-y-1">
      <p className="text-sm text-ink-soft">
        Along the cable from end {end} ({endLabel})
      </p>
      <p className="text-4xl font-bold tabular text-ink sm:text-5xl" data-testid="fault-distance">
        {formatLength(distanceM, unit, 1)}
      </p>
      <p className="text-lg font-semibold tabular">
        Window {formatLength(windowStartM, unit, 1).replace(/ \w+$/, '')}–{formatLength(windowEndM, unit, 1)}
      </p>
      <p className="rounded-md bg-copper-light px-3 py-2 text-lg font-semibold text-ink" data-testid="route-position">
        {routeText}
      </p>
    </div>
  );
}
