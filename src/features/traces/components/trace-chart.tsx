import {
  Chart as ChartJS,
  Legend,
  LinearScale,
  LineElement,
  PointElement,
  Tooltip,
  type ChartData,
  type ChartOptions,
} from 'chart.js';
import annotationPlugin, { type AnnotationOptions } from 'chartjs-plugin-annotation';
import zoomPlugin from 'chartjs-plugin-zoom';
import { useMemo, useRef } from 'react';
import { Line } from 'react-chartjs-2';
import type { TraceDetail } from '../../../../shared/schemas/traces';
import { fromUnit, toUnit, type LengthUnit } from '../../../lib/format';
import { distanceToTime, markerDistances, timeToDistance } from './trace-axis';

ChartJS.register(LineElement, PointElement, LinearScale, Tooltip, Legend, zoomPlugin, annotationPlugin);

const INK = '#1d2731';
const COPPER = '#b8561f';
const TEAL = '#1f6f78';
const MIST = '#6b7a86';

export type XAxis = 'distance' | 'time';

export interface TraceChartProps {
  trace: TraceDetail;
  unit: LengthUnit;
  axis: XAxis;
  selectedEvent: number | null;
  cursors: [number, number];
  showReference: boolean;
  showDifference: boolean;
  /** Called with the distance (m) tapped on the chart. */
  onPick: (distanceM: number) => void;
  /** False on paper: the cursors are for the screen. */
  showCursors?: boolean;
}

/**
 * Amplitude against distance or round-trip time: the trace (min/max decimated
 * on the server), events, the selected event's window shaded, route markers
 * along the axis, two cursors; wheel, pinch or buttons to zoom, drag to pan.
 */
export function TraceChart({ trace, unit, axis, selectedEvent, cursors, showReference, showDifference, onPick, showCursors = true }: TraceChartProps) {
  const chartRef = useRef<ChartJS<'line'>>(null);
  const x = useMemo(
    () => (tNs: number) => (axis === 'time' ? tNs - trace.zeroNs : toUnit(timeToDistance(trace, tNs), unit)),
    [axis, trace, unit],
  );
  const fromDistance = (dM: number) => (axis === 'time' ? distanceToTime(trace, dM) - trace.zeroNs : toUnit(dM, unit));

  const data: ChartData<'line', Array<{ x: number; y: number }>> = {
    datasets: [
      {
        label: trace.originalName,
        data: trace.samples.map((p) => ({ x: x(p.t), y: p.y })),
        borderColor: INK,
        borderWidth: 1.5,
        pointRadius: 0,
      },
      ...(showReference && trace.comparison
        ? [
            {
              label: `Reference: ${trace.comparison.referenceName}`,
              data: trace.comparison.reference.map((p) => ({ x: x(p.t), y: p.y })),
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
              data: trace.comparison.difference.map((p) => ({ x: x(p.t), y: p.y })),
              borderColor: TEAL,
              borderWidth: 1.5,
              pointRadius: 0,
            },
          ]
        : []),
    ],
  };

  const annotations: Record<string, AnnotationOptions> = {};
  const events = trace.analysis?.events ?? [];
  const sel = events.find((e) => e.index === selectedEvent);
  if (sel) {
    annotations.window = {
      type: 'box',
      xMin: fromDistance(sel.windowStartM),
      xMax: fromDistance(sel.windowEndM),
      backgroundColor: 'rgba(184, 86, 31, 0.18)',
      borderWidth: 0,
    };
  }
  for (const e of events) {
    annotations[`event${e.index}`] = {
      type: 'line',
      xMin: fromDistance(e.distanceM),
      xMax: fromDistance(e.distanceM),
      borderColor: e.index === selectedEvent ? COPPER : 'rgba(184, 86, 31, 0.5)',
      borderWidth: e.index === selectedEvent ? 2.5 : 1.5,
      label: {
        display: true,
        content: String(e.index + 1),
        position: 'start',
        backgroundColor: e.index === selectedEvent ? COPPER : 'rgba(184, 86, 31, 0.7)',
        color: '#fff',
        font: { weight: 'bold', size: 13 },
      },
    };
  }
  for (const { marker, distanceM } of markerDistances(trace)) {
    annotations[`marker${marker.id}`] = {
      type: 'line',
      xMin: fromDistance(distanceM),
      xMax: fromDistance(distanceM),
      borderColor: TEAL,
      borderDash: [3, 3],
      borderWidth: 1,
      label: { display: true, content: marker.label, position: 'end', backgroundColor: TEAL, color: '#fff', font: { size: 11 } },
    };
  }
  (showCursors ? cursors : []).forEach((c, i) => {
    annotations[`cursor${i}`] = {
      type: 'line',
      xMin: fromDistance(c),
      xMax: fromDistance(c),
      borderColor: INK,
      borderWidth: 1.5,
      borderDash: i === 0 ? undefined : [8, 4],
      label: { display: true, content: `C${i + 1}`, position: 'center', backgroundColor: INK, color: '#fff', font: { size: 11 } },
    };
  });

  const xTitle = axis === 'time' ? 'Round-trip time (ns)' : `Distance from end ${trace.end} (${unit})`;
  const options: ChartOptions<'line'> = {
    animation: false,
    responsive: true,
    maintainAspectRatio: false,
    parsing: false,
    normalized: true,
    interaction: { mode: 'nearest', intersect: false, axis: 'x' },
    scales: {
      x: { type: 'linear', title: { display: true, text: xTitle }, min: 0 },
      y: { type: 'linear', title: { display: true, text: trace.analysis?.amplitudeUnit === 'rho' ? 'Reflection coefficient' : 'Amplitude (V)' } },
    },
    plugins: {
      legend: { display: !!trace.comparison && (showReference || showDifference), position: 'bottom' },
      tooltip: { enabled: true, callbacks: { title: (items) => (items[0] ? `${items[0].parsed.x?.toFixed(2)} ${axis === 'time' ? 'ns' : unit}` : '') } },
      zoom: {
        pan: { enabled: true, mode: 'x' },
        zoom: { wheel: { enabled: true }, pinch: { enabled: true }, mode: 'x' },
        limits: { x: { minRange: 0.5 } },
      },
      annotation: { annotations },
    },
    onClick: (_evt, _els, chart) => {
      const native = _evt.native as MouseEvent | undefined;
      if (!native) return;
      const rect = chart.canvas.getBoundingClientRect();
      const v = chart.scales.x.getValueForPixel(native.clientX - rect.left);
      if (v === undefined) return;
      const dM = axis === 'time' ? timeToDistance(trace, v + trace.zeroNs) : fromUnit(v, unit);
      onPick(dM);
    },
  };

  return (
    <div>
      <div className="relative h-72 w-full sm:h-96" data-testid="trace-chart">
        <Line ref={chartRef} data={data} options={options} aria-label={`Trace ${trace.originalName}`} role="img" />
      </div>
      <div className="mt-2 flex flex-wrap gap-2">
        <button type="button" className="min-h-11 rounded-md border border-rule bg-card px-3 text-sm font-semibold" onClick={() => chartRef.current?.zoom(1.5)}>
          Zoom in
        </button>
        <button type="button" className="min-h-11 rounded-md border border-rule bg-card px-3 text-sm font-semibold" onClick={() => chartRef.current?.zoom(1 / 1.5)}>
          Zoom out
        </button>
        <button type="button" className="min-h-11 rounded-md border border-rule bg-card px-3 text-sm font-semibold" onClick={() => chartRef.current?.resetZoom()}>
          Show all
        </button>
        {sel && (
          <button
            type="button"
            className="min-h-11 rounded-md border border-rule bg-card px-3 text-sm font-semibold"
            onClick={() => {
              const span = Math.max(sel.windowEndM - sel.windowStartM, 1) * 6;
              chartRef.current?.zoomScale('x', { min: fromDistance(sel.distanceM - span), max: fromDistance(sel.distanceM + span) });
            }}
          >
            Zoom to event {sel.index + 1}
          </button>
        )}
      </div>
    </div>
  );
}
