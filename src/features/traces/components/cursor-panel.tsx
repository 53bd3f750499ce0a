import type { TraceDetail } from '../../../../shared/schemas/traces';
import { Button } from '../../../components/ui/button';
import { formatLength, type LengthUnit } from '../../../lib/format';
import { formatNs, type XAxis } from '../chart/axis-map';
import { distanceToTime } from './trace-axis';

/**
 * The two cursors' positions and the gap between them, read in the chart's
 * axis unit: round-trip nanoseconds in the time view, the reader's length
 * unit in the distance view. Drag them on the chart, tap the chart to move
 * the chosen one, or slide them here.
 */
export function CursorPanel({
  trace,
  unit,
  axis,
  cursors,
  active,
  onActive,
  onMove,
}: {
  trace: TraceDetail;
  unit: LengthUnit;
  axis: XAxis;
  cursors: [number, number];
  active: 0 | 1;
  onActive: (i: 0 | 1) => void;
  onMove: (i: 0 | 1, distanceM: number) => void;
}) {
  const rangeM = trace.analysis?.rangeM ?? 0;
  const ns = (dM: number) => distanceToTime(trace, dM) - trace.zeroNs;
  const read = (dM: number) => (axis === 'time' ? formatNs(ns(dM)) : formatLength(dM, unit));
  const gap = axis === 'time' ? formatNs(Math.abs(ns(cursors[1]) - ns(cursors[0]))) : formatLength(Math.abs(cursors[1] - cursors[0]), unit);
  return (
    <div className="mt-4 space-y-3" role="group" aria-label="Cursors">
      <p className="text-sm text-ink-soft">Drag C1 or C2 along the chart, tap the chart to move the chosen one, or slide it here.</p>
      {([0, 1] as const).map((i) => (
        <div key={i} className="flex flex-wrap items-center gap-3">
          <Button variant={active === i ? 'primary' : 'secondary'} aria-pressed={active === i} onClick={() => onActive(i)}>
            C{i + 1}
          </Button>
          <input
            type="range"
            className="h-11 min-w-0 flex-1 accent-copper"
            aria-label={`Cursor ${i + 1} position`}
            aria-valuetext={read(cursors[i])}
            min={0}
            max={rangeM}
            step={rangeM / 2000}
            value={cursors[i]}
            onChange={(e) => onMove(i, Number(e.target.value))}
          />
          <span className="min-w-24 text-right text-lg font-semibold tabular" data-testid={`cursor-${i + 1}`}>
            {read(cursors[i])}
          </span>
        </div>
      ))}
      <p className="text-lg font-bold tabular" data-testid="cursor-gap">
        Between cursors: {gap}
        {axis === 'time' && <span className="font-normal text-ink-soft"> round trip</span>}
      </p>
    </div>
  );
}
