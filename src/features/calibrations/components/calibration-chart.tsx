import { Chart as ChartJS, Legend, LinearScale, LineElement, PointElement, Tooltip, type ChartData, type ChartOptions } from 'chart.js';
import { Scatter } from 'react-chartjs-2';
import type { CalibrationStats } from '../../../../shared/cable/calibration';
import type { CalibrationView } from '../../../../shared/schemas/cables';
import { formatDate, formatLength, type LengthUnit } from '../../../lib/format';

ChartJS.register(LinearScale, PointElement, LineElement, Tooltip, Legend);

const INK = '#1d2731';
const COPPER = '#b8561f';
const TEAL = '#1f6f78';
const OK = '#2a7052';
const MIST = '#5a6874';

type Point = { x: number; y: number };

/**
 * The ticks along the calibrations axis: whole positions only, one per
 * calibration (at most about ten, evenly spread), each named by the
 * calibration's number, so one calibration is one tick in the middle.
 */
export function calibrationTicks(idsOldestFirst: readonly number[]): Array<{ value: number; label: string }> {
  const every = Math.max(1, Math.ceil(idsOldestFirst.length / 10));
  return idsOldestFirst.flatMap((id, i) => (i % every === 0 ? [{ value: i + 1, label: `#${id}` }] : []));
}

/**
 * Each calibration's VF in the order submitted, against the library's value
 * and the mean ± one standard deviation of those not rejected.
 */
export function CalibrationChart({
  items,
  stats,
  libraryVf,
  unit,
  animate = true,
}: {
  items: CalibrationView[];
  stats: CalibrationStats;
  libraryVf: number;
  unit: LengthUnit;
  animate?: boolean;
}) {
  const ordered = [...items].reverse();
  const n = Math.max(1, ordered.length);
  const byStatus = (status: CalibrationView['status']): Point[] =>
    ordered.flatMap((c, i) => (c.status === status ? [{ x: i + 1, y: c.vf }] : []));
  // Calibrations sit at 1…n with half a step of room either side; the lines for the library value,
  // mean and spread run the whole width. One calibration is one point in the middle, labelled by its number.
  const flat = (y: number): Point[] => [
    { x: 0.5, y },
    { x: n + 0.5, y },
  ];
  const datasets: ChartData<'scatter', Point[]>['datasets'] = [
    { label: 'Accepted', data: byStatus('accepted'), backgroundColor: OK, borderColor: OK, pointRadius: 6, pointStyle: 'circle' },
    { label: 'Pending', data: byStatus('pending'), backgroundColor: '#ffffff', borderColor: COPPER, borderWidth: 2, pointRadius: 6, pointStyle: 'circle' },
    { label: 'Rejected', data: byStatus('rejected'), backgroundColor: MIST, borderColor: MIST, pointRadius: 5, pointStyle: 'crossRot', borderWidth: 2 },
    { label: 'Library VF', data: flat(libraryVf), showLine: true, borderColor: INK, borderWidth: 2, pointRadius: 0 },
  ];
  if (stats.mean !== null) datasets.push({ label: 'Mean', data: flat(stats.mean), showLine: true, borderColor: TEAL, borderWidth: 2, borderDash: [6, 4], pointRadius: 0 });
  if (stats.mean !== null && stats.stdDev !== null) {
    datasets.push(
      { label: '± 1 s.d.', data: flat(stats.mean + stats.stdDev), showLine: true, borderColor: TEAL, borderWidth: 1, borderDash: [2, 3], pointRadius: 0 },
      { label: '− 1 s.d.', data: flat(stats.mean - stats.stdDev), showLine: true, borderColor: TEAL, borderWidth: 1, borderDash: [2, 3], pointRadius: 0 },
    );
  }
  // A fixed, padded range: equal values would otherwise give an axis of identical labels.
  const ys = [libraryVf, ...ordered.map((c) => c.vf)];
  if (stats.mean !== null) ys.push(stats.mean + (stats.stdDev ?? 0), stats.mean - (stats.stdDev ?? 0));
  const pad = Math.max(0.005, (Math.max(...ys) - Math.min(...ys)) * 0.15);
  const yMin = Math.floor((Math.min(...ys) - pad) * 1000) / 1000;
  const yMax = Math.ceil((Math.max(...ys) + pad) * 1000) / 1000;
  const options: ChartOptions<'scatter'> = {
    animation: animate ? undefined : false,
    maintainAspectRatio: false,
    scales: {
      x: {
        type: 'linear',
        min: 0.5,
        max: n + 0.5,
        afterBuildTicks: (axis) => {
          axis.ticks = calibrationTicks(ordered.map((c) => c.id)).map(({ value }) => ({ value }));
        },
        ticks: { autoSkip: false, callback: (v) => calibrationTicks(ordered.map((c) => c.id)).find((t) => t.value === Number(v))?.label ?? '' },
        grid: { display: false },
        title: { display: true, text: 'Calibration number, oldest first' },
      },
      y: { min: yMin, max: yMax, title: { display: true, text: 'Velocity factor' }, ticks: { callback: (v) => Number(v).toFixed(3) } },
    },
    plugins: {
      legend: { position: 'bottom', labels: { filter: (item) => item.text !== '− 1 s.d.', boxWidth: 14 } },
      tooltip: {
        callbacks: {
          label: (ctx) => {
            if (ctx.dataset.showLine) return `${ctx.dataset.label}: ${(ctx.parsed.y ?? 0).toFixed(4)}`;
            const c = ordered[Math.round(ctx.parsed.x ?? 0) - 1];
            return c ? `#${c.id} ${c.status}: VF ${c.vf.toFixed(4)} · ${formatLength(c.knownLengthM, unit)} · ${formatDate(c.createdAt)}` : '';
          },
        },
      },
    },
  };
  return (
    <div className="h-64" role="img" aria-label={`Chart of ${items.length} calibrations against the library VF ${libraryVf}`}>
      <Scatter data={{ datasets }} options={options} />
    </div>
  );
}
