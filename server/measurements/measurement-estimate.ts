import {
  capacitanceMethod,
  loopResistanceMethod,
  murrayLoop,
  varleyLoop,
  type CableRunInput,
  type LocationEstimate,
} from '../../shared/locate';
import { MEASUREMENT_KIND_LABELS, type MeasurementReadings } from '../../shared/schemas/measurements';

/**
 * Standard uncertainty of a run's installed length as a fraction of it: the
 * records do not carry one, and as-built lengths are commonly good to about
 * 1 % (common practice). Every reading placed through the length shares it.
 */
export const INSTALLED_LENGTH_RELATIVE_U = 0.01;

/** A cable run as the location methods take it. */
export function runInput(run: { installedLengthM: number }): CableRunInput {
  return { installedLengthM: run.installedLengthM, installedLengthUM: INSTALLED_LENGTH_RELATIVE_U * run.installedLengthM };
}

/**
 * The location estimate a measurement's readings give on a run. Throws
 * LocateInputError (with `field` under 'readings') for readings that give none.
 */
export function measurementEstimate(m: MeasurementReadings & { id?: number }, run: CableRunInput): LocationEstimate {
  const id = m.id === undefined ? 'measurement' : `measurement-${m.id}`;
  const label = `${MEASUREMENT_KIND_LABELS[m.kind]} from end ${m.readings.fromEnd}${m.id === undefined ? '' : ` (reading ${m.id})`}`;
  switch (m.kind) {
    case 'murray':
      return murrayLoop(id, run, { ...m.readings, label }, 'readings');
    case 'varley':
      return varleyLoop(id, run, { ...m.readings, label }, 'readings');
    case 'capacitance':
      return capacitanceMethod(id, run, { ...m.readings, label }, 'readings');
    case 'loop-resistance':
      return loopResistanceMethod(id, run, { ...m.readings, label }, 'readings');
  }
}
