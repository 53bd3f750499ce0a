import { BarElement, CategoryScale, Chart as ChartJS, Legend, LinearScale, Tooltip, type ChartData, type ChartOptions } from 'chart.js';
import { Bar } from 'react-chartjs-2';
import type { DashboardView } from '../../../../shared/schemas/tickets';
import { toUnit, type LengthUnit } from '../../../lib/format';
import { wrapLabel } from './wrap-label';

ChartJS.register(BarElement, CategoryScale, LinearScale, Tooltip, Legend);

const COPPER = '#b8561f';
const TEAL = '#1f6f78';

/** Mean located-vs-found error per cable type: the size of the miss and which way it leans. */
export function AccuracyChart({ rows, unit }: { rows: DashboardView['accuracy']; unit: LengthUnit }) {
  // On a phone the cable names are broken into short lines, so the axis keeps them whole instead of cutting them off.
  const narrow = typeof window !== 'undefined' && window.matchMedia?.('(max-width: 640px)').matches;
  const data: ChartData<'bar', number[], string[]> = {
    labels: rows.map((r) => wrapLabel(`${r.cableType.name} (${r.count})`, narrow ? 14 : 28)),
    datasets: [
      { label: `Mean miss, either way (${unit})`, data: rows.map((r) => toUnit(r.meanAbsErrorM, unit)), backgroundColor: COPPER },
      { label: `Mean located − found (${unit})`, data: rows.map((r) => toUnit(r.meanErrorM, unit)), backgroundColor: TEAL },
    ],
  };
  const options: ChartOptions<'bar'> = {
    indexAxis: 'y',
    responsive: true,
    maintainAspectRatio: false,
    animation: false,
    plugins: { legend: { position: 'bottom' }, tooltip: { callbacks: { label: (c) => `${c.dataset.label}: ${Number(c.raw).toFixed(2)}` } } },
    scales: { x: { title: { display: true, text: unit === 'ft' ? 'feet of cable' : 'metres of cable' } } },
  };
  return (
    <div style={{ height: Math.max(160, rows.length * (narrow ? 90 : 70) + 80) }} role="img" aria-label="Located-vs-found error per cable type">
      <Bar data={data} options={options} />
    </div>
  );
}
