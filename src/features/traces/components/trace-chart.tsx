import {
  Chart as ChartJS,
  Legend,
  LinearScale,
  LineElement,
  PointElement,
  Tooltip,
  type ChartData,
  type ChartOptions,
  type Plugin,
} from 'chart.js';
import annotationPlugin, { type AnnotationOptions } from 'chartjs-plugin-annotation';
import { useMemo, useRef, useState } from 'react';
import { Line } from 'react-chartjs-2';
import type { TraceDetail } from '../../../../shared/schemas/traces';
import { formatLength, type LengthUnit } from '../../../lib/format';
import { useTraceSamples } from '../api/get-trace-samples';
import { axisMap, formatNs, type AxisMap, type XAxis } from '../chart/axis-map';
import { ChartControls, type DistanceGainState } from '../chart/chart-controls';
import { CursorHandles, LabelStrip } from '../chart/chart-overlays';
import { distanceGain, median, pulseWithGain, stepGainCarry, stepWithGain, verticalRange, type ChartPoint } from '../chart/gain';
import { useChartGestures, type PlotGeometry } from '../chart/use-chart-gestures';
import { useLibraryLoss } from '../chart/use-library-loss';
import { pointsForView, zoomRange, type Range } from '../chart/view-window';
import { markerDistances } from './trace-axis';

ChartJS.register(LineElement, PointElement, LinearScale, Tooltip, Legend, annotationPlugin);

const INK = '#1d2731';
const COPPER = '#b8561f';
const TEAL = '#1f6f78';
const MIST = '#5a6874';

export type { XAxis };

export interface TraceChartProps {
  trace: TraceDetail;
  unit: LengthUnit;
  axis: XAxis;
  selectedEvent: number | null;
  /** Cursor positions, distance along the cable (m); none drawn when not given. */
  cursors?: [number, number];
  /** The cursor a tap moves. */
  activeCursor?: 0 | 1;
  showReference: boolean;
  showDifference: boolean;
  /** Called with the distance (m) tapped on the chart. */
  onPick?: (distanceM: number) => void;
  /** Called while a cursor is dragged, with its new distance (m). */
  onCursorMove?: (i: 0 | 1, distanceM: number) => void;
  /** Off for a printed sheet: no controls, handles or zoomed fetches. */
  interactive?: boolean;
  /** False to leave the cursors off (a printed sheet). */
  showCursors?: boolean;
}

/** The view range as chosen, remembered with the axis and unit it was chosen in. */
interface View {
  key: string;
  range: Range;
}

/** A window of the record around the view, on a coarse grid so small pans reuse it. */
function detailWindow(map: AxisMap, range: Range, plotPx: number) {
  const t0 = map.timeOf(range.min);
  const t1 = map.timeOf(range.max);
  const span = Math.max(t1 - t0, 1e-6);
  const grid = 10 ** Math.floor(Math.log10(span));
  return {
    fromNs: Math.floor((t0 - span / 2) / grid) * grid,
    toNs: Math.ceil((t1 + span / 2) / grid) * grid,
    points: Math.min(20000, Math.max(100, Math.ceil((plotPx * 4) / 100) * 100)),
  };
}

function withGain(
  points: ChartPoint[],
  gainAt: ((x: number) => number) | null,
  mode: 'step' | 'pulse',
  baseline: number,
  overview: ChartPoint[],
) {
  if (!gainAt || points.length === 0) return points;
  return mode === 'pulse'
    ? pulseWithGain(points, gainAt, baseline)
    : stepWithGain(points, gainAt, stepGainCarry(overview, gainAt, points[0].x));
}

/**
 * Amplitude against distance or round-trip time: the trace drawn at about
 * two points per pixel of whatever is in view (a zoomed view fetches that
 * stretch of the record at full detail), the events and the selected event's
 * window, route markers with labels that never overlap, two draggable
 * cursors, vertical gain and a distance gain for far echoes.
 */
export function TraceChart({
  trace,
  unit,
  axis,
  selectedEvent,
  cursors,
  activeCursor = 0,
  showReference,
  showDifference,
  onPick,
  onCursorMove,
  interactive = true,
  showCursors = true,
}: TraceChartProps) {
  const map = useMemo(() => axisMap(trace, axis, unit), [trace, axis, unit]);
  const overview = useMemo(() => trace.samples.map((p) => ({ x: map.ofTime(p.t), y: p.y })), [trace.samples, map]);
  const limits = useMemo<Range>(
    () => ({ min: 0, max: Math.max(overview.length ? overview[overview.length - 1].x : 1, 1e-6) }),
    [overview],
  );
  // The first view: the cable's installed length (or the farthest event's window, if that is further) and a
  // little more, when the record runs well past it; a fault at 260 m of a 1.4 km cable on a 2 km record would
  // otherwise sit in the first eighth of the chart. "Whole trace" shows the full record.
  const cableView = useMemo<Range | null>(() => {
    const lengthM = trace.cableRun?.installedLengthM;
    if (!interactive || !(lengthM && lengthM > 0)) return null;
    const farM = Math.max(lengthM, ...(trace.analysis?.events ?? []).filter((e) => e.likelyMultipleOf === null).map((e) => e.windowEndM));
    const hi = map.ofDistance(farM * 1.1);
    return Number.isFinite(hi) && hi > limits.min && hi < limits.min + 0.9 * (limits.max - limits.min) ? { min: limits.min, max: hi } : null;
  }, [trace.cableRun?.installedLengthM, trace.analysis?.events, interactive, map, limits]);
  const viewKey = `${trace.id}:${axis}:${unit}`;
  const [view, setView] = useState<View | null>(null);
  const range = view?.key === viewKey ? view.range : (cableView ?? limits);
  const setRange = (r: Range) => setView({ key: viewKey, range: r });
  const [geometry, setGeometry] = useState<PlotGeometry | null>(null);
  const [gain, setGain] = useState(1);
  const [shift, setShift] = useState(0);
  const library = useLibraryLoss(trace, interactive);
  const [ddg, setDdg] = useState<DistanceGainState | null>(null);
  const distance = ddg ?? { on: false, dbPer100m: library.dbPer100m ?? 0 };

  const plotPx = geometry ? geometry.right - geometry.left : 300;
  const a = trace.analysis;
  const mode = a?.mode ?? 'step';
  const stepX = Math.abs(map.ofTime(trace.zeroNs + (a?.sampleIntervalNs ?? 1)) - map.ofTime(trace.zeroNs));
  const minSpan = Math.max(20 * stepX, (limits.max - limits.min) / 20000);
  const zoomed = range.max - range.min < (limits.max - limits.min) * 0.999;

  // A zoomed view with fewer overview points than pixels fetches its stretch of the record at full detail.
  const inView = zoomed ? overview.filter((p) => p.x >= range.min && p.x <= range.max).length : overview.length;
  const wantDetail = interactive && zoomed && trace.sampleCount > trace.samples.length && inView < plotPx * 1.5;
  const detail = useTraceSamples(trace.id, wantDetail ? detailWindow(map, range, plotPx) : null);
  const detailPoints = useMemo(
    () => detail.data?.samples.map((p) => ({ x: map.ofTime(p.t), y: p.y })) ?? null,
    [detail.data, map],
  );
  const covers =
    wantDetail && !!detail.data && detail.data.fromNs <= map.timeOf(range.min) && detail.data.toNs >= map.timeOf(range.max);
  const source = covers && detailPoints ? detailPoints : overview;

  const blindX = map.ofDistance(a?.blindZoneM ?? 0);
  const baseline = useMemo(() => median(overview.filter((p) => p.x > blindX).map((p) => p.y)), [overview, blindX]);
  const gainAt =
    distance.on && distance.dbPer100m > 0 ? (x: number) => distanceGain(map.distanceOf(x), distance.dbPer100m) : null;
  const inRange = pointsForView(source, range.min, range.max, plotPx);
  const drawn = withGain(inRange, gainAt, mode, baseline, overview);
  const comparison = (pts: Array<{ t: number; y: number }>) =>
    withGain(
      pointsForView(
        pts.map((p) => ({ x: map.ofTime(p.t), y: p.y })),
        range.min,
        range.max,
        plotPx,
      ),
      gainAt,
      mode,
      baseline,
      overview,
    );

  const events = a?.events ?? [];
  const selected = events.find((e) => e.index === selectedEvent);
  const cursorX: [number, number] | null =
    cursors && showCursors ? [map.ofDistance(cursors[0]), map.ofDistance(cursors[1])] : null;

  // Vertical gain magnifies the trace as recorded (so ×4 means the same whether or not far echoes are lifted),
  // about the trace's level at the chosen cursor (or the middle of the view); ▲/▼ move the band by a quarter.
  const ys = drawn.map((p) => p.y);
  const recorded = verticalRange(
    inRange.map((p) => p.y),
    1,
  );
  const band = (recorded.max - recorded.min) / gain;
  const focusX =
    cursorX && cursorX[activeCursor] >= range.min && cursorX[activeCursor] <= range.max
      ? cursorX[activeCursor]
      : (range.min + range.max) / 2;
  const near = drawn.filter((p) => Math.abs(p.x - focusX) <= (range.max - range.min) / 50);
  const centre = median((near.length ? near : drawn).map((p) => p.y)) + (shift * band) / 4;
  const yRange = gain > 1 ? { min: centre - band / 2, max: centre + band / 2 } : verticalRange(ys, 1);

  const px = (x: number) =>
    geometry ? geometry.left + ((x - geometry.xMin) / (geometry.xMax - geometry.xMin)) * (geometry.right - geometry.left) : 0;
  const onScreen = (x: number) => geometry !== null && x >= geometry.xMin && x <= geometry.xMax;
  const cursorPx: [number | null, number | null] = cursorX
    ? [onScreen(cursorX[0]) ? px(cursorX[0]) : null, onScreen(cursorX[1]) ? px(cursorX[1]) : null]
    : [null, null];

  const plot = useRef<HTMLDivElement>(null);
  const gestures = useChartGestures(plot, {
    geometry,
    range,
    limits,
    minSpan,
    cursorPx,
    setRange,
    onTap: (x) => onPick?.(map.distanceOf(x)),
    onCursorDrag: (i, x) => onCursorMove?.(i, map.distanceOf(x)),
  });

  const annotations: Record<string, AnnotationOptions> = {};
  if (selected) {
    annotations.window = {
      type: 'box',
      xMin: map.ofDistance(selected.windowStartM),
      xMax: map.ofDistance(selected.windowEndM),
      backgroundColor: 'rgba(184, 86, 31, 0.18)',
      borderWidth: 0,
    };
  }
  for (const e of events) {
    const x = map.ofDistance(e.distanceM);
    const on = e.index === selectedEvent;
    annotations[`event${e.index}`] = {
      type: 'line',
      xMin: x,
      xMax: x,
      borderColor: on ? COPPER : 'rgba(184, 86, 31, 0.5)',
      borderWidth: on ? 2.5 : 1.5,
    };
  }
  const markers = markerDistances(trace);
  for (const { marker, distanceM } of markers) {
    const x = map.ofDistance(distanceM);
    annotations[`marker${marker.id}`] = { type: 'line', xMin: x, xMax: x, borderColor: TEAL, borderDash: [3, 3], borderWidth: 1 };
  }
  cursorX?.forEach((x, i) => {
    annotations[`cursor${i}`] = {
      type: 'line',
      xMin: x,
      xMax: x,
      borderColor: INK,
      borderWidth: i === activeCursor ? 2 : 1.5,
      borderDash: i === 0 ? undefined : [8, 4],
    };
  });

  const data: ChartData<'line', ChartPoint[]> = {
    datasets: [
      { label: trace.originalName, data: drawn, borderColor: INK, borderWidth: 1.5, pointRadius: 0 },
      ...(showReference && trace.comparison
        ? [
            {
              label: `Reference: ${trace.comparison.referenceName}`,
              data: comparison(trace.comparison.reference),
              borderColor: MIST,
              borderDash: [6, 4],
              borderWidth: 1.5,
              pointRadius: 0,
            },
          ]
        : []),
      ...(showDifference && trace.comparison
        ? [
            {
              label: 'Difference (this − reference)',
              data: comparison(trace.comparison.difference),
              borderColor: TEAL,
              borderWidth: 1.5,
              pointRadius: 0,
            },
          ]
        : []),
    ],
  };

  const geometryPlugin = useMemo<Plugin<'line'>>(
    () => ({
      id: 'rhologPlotGeometry',
      afterLayout: (chart) => {
        const { left, right } = chart.chartArea;
        const xMin = chart.scales.x.min;
        const xMax = chart.scales.x.max;
        setGeometry((g) =>
          g && g.left === left && g.right === right && g.xMin === xMin && g.xMax === xMax ? g : { left, right, xMin, xMax },
        );
      },
    }),
    [],
  );

  const readout = (x: number) => (axis === 'time' ? formatNs(x) : formatLength(map.distanceOf(x), unit));
  const amplitude = a?.amplitudeUnit === 'rho' ? 'Reflection coefficient' : 'Amplitude (V)';
  const options: ChartOptions<'line'> = {
    animation: false,
    responsive: true,
    maintainAspectRatio: false,
    parsing: false,
    normalized: true,
    events: ['mousemove', 'mouseout'],
    interaction: { mode: 'nearest', intersect: false, axis: 'x' },
    scales: {
      x: {
        type: 'linear',
        min: range.min,
        max: range.max,
        ticks: { includeBounds: false },
        title: { display: true, text: axis === 'time' ? 'Round-trip time (ns)' : `Distance from end ${trace.end} (${unit})` },
      },
      y: {
        type: 'linear',
        min: yRange.min,
        max: yRange.max,
        ticks: { includeBounds: false },
        title: { display: true, text: gain > 1 || gainAt ? `${amplitude}, magnified` : amplitude },
      },
    },
    plugins: {
      legend: { display: !!trace.comparison && (showReference || showDifference), position: 'bottom' },
      tooltip: { enabled: true, callbacks: { title: (items) => (items[0]?.parsed.x != null ? readout(items[0].parsed.x) : '') } },
      annotation: { annotations },
    },
  };

  const plotLeft = geometry?.left ?? 0;
  const plotRight = geometry?.right ?? 0;
  const narrow = plotRight - plotLeft < 420;
  const zoomBy = (factor: number) => setRange(zoomRange(range, factor, (range.min + range.max) / 2, limits, minSpan));

  return (
    <div>
      <div
        data-testid="trace-chart-frame"
        data-plot-left={plotLeft}
        data-plot-right={plotRight}
        data-x-min={geometry?.xMin}
        data-x-max={geometry?.xMax}
      >
        {geometry && (
          <>
            <LabelStrip
              label="Events on the chart"
              testId="event-label"
              tone="copper"
              rows={2}
              plotLeft={plotLeft}
              plotRight={plotRight}
              labels={events
                .filter((e) => onScreen(map.ofDistance(e.distanceM)))
                .map((e) => ({
                  id: `e${e.index}`,
                  text: String(e.index + 1),
                  x: px(map.ofDistance(e.distanceM)),
                  priority: e.index === selectedEvent ? 2 : e.likelyMultipleOf === null ? 1 : 0,
                  title: `Event ${e.index + 1}`,
                }))}
            />
            <LabelStrip
              label="Route markers on the chart"
              testId="marker-label"
              tone="teal"
              rows={narrow ? 2 : 3}
              plotLeft={plotLeft}
              plotRight={plotRight}
              labels={markers
                .filter((m) => onScreen(map.ofDistance(m.distanceM)))
                .map((m) => ({
                  id: `m${m.marker.id}`,
                  text: m.marker.label,
                  x: px(map.ofDistance(m.distanceM)),
                  title: `${m.marker.label} at ${formatLength(m.distanceM, unit)} of cable`,
                }))}
            />
          </>
        )}
        <div
          ref={plot}
          className="relative h-72 w-full touch-pan-y select-none sm:h-96"
          data-testid="trace-chart"
          {...(interactive ? gestures : {})}
        >
          <Line data={data} options={options} plugins={[geometryPlugin]} aria-label={`Trace ${trace.originalName}`} role="img" />
        </div>
        {interactive && geometry && cursorX && (
          <CursorHandles
            positions={cursorPx}
            plotLeft={plotLeft}
            plotRight={plotRight}
            active={activeCursor}
            readouts={[readout(cursorX[0]), readout(cursorX[1])]}
            onDrag={(i, p) => {
              const clamped = Math.max(plotLeft, Math.min(plotRight, p));
              onCursorMove?.(
                i,
                map.distanceOf(geometry.xMin + ((clamped - plotLeft) / (plotRight - plotLeft)) * (geometry.xMax - geometry.xMin)),
              );
            }}
            onStep={(i, p) =>
              onCursorMove?.(
                i,
                map.distanceOf(geometry.xMin + ((p - plotLeft) / (plotRight - plotLeft)) * (geometry.xMax - geometry.xMin)),
              )
            }
          />
        )}
      </div>
      {interactive && cableView && view?.key !== viewKey && (
        <p className="mt-1 text-xs text-ink-soft print:hidden" data-testid="chart-view-note">
          Showing the cable's {formatLength(trace.cableRun.installedLengthM, unit)} and a little more; the record runs to{' '}
          {formatLength(map.distanceOf(limits.max), unit)}. Whole trace shows all of it.
        </p>
      )}
      {interactive && (
        <ChartControls
          onZoom={zoomBy}
          onShowAll={() => setRange(limits)}
          zoomToEvent={
            selected
              ? {
                  label: `Event ${selected.index + 1} close up`,
                  go: () => {
                    const spanM = Math.max(selected.windowEndM - selected.windowStartM, 1) * 6;
                    const lo = map.ofDistance(selected.distanceM - spanM);
                    const hi = map.ofDistance(selected.distanceM + spanM);
                    setRange(zoomRange({ min: lo, max: hi }, 1, (lo + hi) / 2, limits, minSpan));
                  },
                }
              : null
          }
          gain={gain}
          onGain={(g) => (setGain(g), g === 1 && setShift(0))}
          onShift={(q) => setShift((s) => s + q)}
          distanceGain={distance}
          onDistanceGain={setDdg}
          libraryLoss={library.text}
        />
      )}
    </div>
  );
}
