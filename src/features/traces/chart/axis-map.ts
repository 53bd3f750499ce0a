import type { TraceDetail } from '../../../../shared/schemas/traces';
import { fromUnit, toUnit, type LengthUnit } from '../../../lib/format';
import { distanceToTime, timeToDistance } from '../components/trace-axis';

export type XAxis = 'distance' | 'time';

/**
 * The chart's horizontal axis and the trace's own measures: round-trip time
 * on the file's axis (ns) and distance along the cable (m). The time view
 * counts from the launch (ns); the distance view is in the reader's unit.
 */
export interface AxisMap {
  axis: XAxis;
  /** x of a time on the file's axis. */
  ofTime: (tNs: number) => number;
  /** Time on the file's axis of an x. */
  timeOf: (x: number) => number;
  ofDistance: (dM: number) => number;
  distanceOf: (x: number) => number;
  /** The axis unit as the readouts write it. */
  unitLabel: string;
}

export function axisMap(trace: TraceDetail, axis: XAxis, unit: LengthUnit): AxisMap {
  if (axis === 'time') {
    return {
      axis,
      ofTime: (t) => t - trace.zeroNs,
      timeOf: (x) => x + trace.zeroNs,
      ofDistance: (d) => distanceToTime(trace, d) - trace.zeroNs,
      distanceOf: (x) => timeToDistance(trace, x + trace.zeroNs),
      unitLabel: 'ns',
    };
  }
  return {
    axis,
    ofTime: (t) => toUnit(timeToDistance(trace, t), unit),
    timeOf: (x) => distanceToTime(trace, fromUnit(x, unit)),
    ofDistance: (d) => toUnit(d, unit),
    distanceOf: (x) => fromUnit(x, unit),
    unitLabel: unit,
  };
}

/** A round-trip time as the readouts write it: "412.3 ns", "9.84 ns". */
export function formatNs(ns: number): string {
  const a = Math.abs(ns);
  const s = a.toFixed(a < 100 ? 2 : 1);
  return `${ns < 0 && Number(s) !== 0 ? '−' : ''}${s} ns`;
}
