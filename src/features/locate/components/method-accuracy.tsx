import type { MethodAccuracyRow } from '../../../../shared/schemas/method-scores';
import { formatLength, formatSignedLength, type LengthUnit } from '../../../lib/format';

/**
 * Located against found for each method, over every close-out and then per
 * cable type: how far each method's estimate was from where the crew found
 * the fault, which way it leans, and how often the find fell inside the
 * method's own 95 % window (about 19 in 20 when its uncertainty is honest).
 */
export function MethodAccuracyTable({ rows, unit }: { rows: MethodAccuracyRow[]; unit: LengthUnit }) {
  if (rows.length === 0)
    return (
      <p className="text-sm text-mist">
        No close-outs yet. At each one, every reading of the fault is compared with where it was found.
      </p>
    );
  return (
    <div>
      {/* On a phone each method is a short block of its own rather than a table wider than the screen. */}
      <ul className="divide-y divide-rule sm:hidden" data-testid="method-accuracy-list">
        {rows.map((r) => (
          <li
            key={`${r.method}-${r.cableType?.id ?? 'all'}`}
            className={`py-2 text-sm tabular ${r.cableType ? 'pl-4 text-ink-soft' : ''}`}
          >
            <p className={r.cableType ? '' : 'font-semibold'}>{r.cableType ? r.cableType.name : r.label}</p>
            <dl className="mt-1 grid grid-cols-2 gap-x-3 gap-y-0.5">
              <dt className="text-mist">Repairs</dt>
              <dd className="text-right">{r.count}</dd>
              <dt className="text-mist">Mean miss</dt>
              <dd className="text-right">{formatLength(r.meanAbsErrorM, unit)}</dd>
              <dt className="text-mist">Lean</dt>
              <dd className="text-right">{formatSignedLength(r.meanErrorM, unit)}</dd>
              <dt className="text-mist">Largest</dt>
              <dd className="text-right">{formatLength(r.maxAbsErrorM, unit)}</dd>
              <dt className="text-mist">Inside its window</dt>
              <dd className="text-right">
                {r.withinWindow} of {r.count}
              </dd>
            </dl>
          </li>
        ))}
      </ul>
      <div className="hidden overflow-x-auto sm:block">
        <table className="w-full min-w-[34rem] text-left text-sm tabular" data-testid="method-accuracy">
          <thead className="text-xs uppercase text-mist">
            <tr>
              <th className="py-2">Method</th>
              <th className="text-right">Repairs</th>
              <th className="text-right">Mean miss</th>
              <th className="text-right">Lean</th>
              <th className="text-right">Largest</th>
              <th className="text-right">Inside its window</th>
            </tr>
          </thead>
          <tbody>
            {rows.map((r) => (
              <tr
                key={`${r.method}-${r.cableType?.id ?? 'all'}`}
                className={r.cableType ? 'text-ink-soft' : 'border-t border-rule font-semibold'}
              >
                <td className={`py-1.5 ${r.cableType ? 'pl-4' : ''}`}>{r.cableType ? r.cableType.name : r.label}</td>
                <td className="text-right">{r.count}</td>
                <td className="text-right">{formatLength(r.meanAbsErrorM, unit)}</td>
                <td className="text-right">{formatSignedLength(r.meanErrorM, unit)}</td>
                <td className="text-right">{formatLength(r.maxAbsErrorM, unit)}</td>
                <td className="text-right">
                  {r.withinWindow} of {r.count}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <p className="mt-2 text-xs text-mist">
        Misses are located − found along the cable from the end each method measured from; a positive lean means it placed faults
        too far out. Each method is listed for every cable type together, then per cable type.
      </p>
    </div>
  );
}
