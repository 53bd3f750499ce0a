import type { MethodScoreView } from '../../../../shared/schemas/method-scores';
import { formatLength, formatSignedLength, type LengthUnit } from '../../../lib/format';

/** At close-out: each reading of the fault, and the best location, against where the crew found it. */
export function MethodScores({ scores, unit }: { scores: MethodScoreView[]; unit: LengthUnit }) {
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-left text-sm tabular" data-testid="method-scores">
        <caption className="mb-1 text-left text-xs font-semibold uppercase tracking-wide text-mist">Each reading against where it was found</caption>
        <thead className="text-xs uppercase text-mist">
          <tr>
            <th className="py-1">Reading</th>
            <th className="pl-2 text-right">Located</th>
            <th className="whitespace-nowrap text-right">Found</th>
            <th className="whitespace-nowrap text-right">Miss</th>
            <th className="pl-2 text-right">In window</th>
          </tr>
        </thead>
        <tbody>
          {scores.map((s) => (
            <tr key={`${s.method}-${s.label}`} className={`border-t border-rule ${s.method === 'best-location' ? 'font-semibold' : ''}`}>
              <td className="py-1">{s.label}</td>
              {/* The length and its end may go on two lines: on a phone the whole table then fits, "In window" included. */}
              <td className="pl-2 text-right">
                <span className="whitespace-nowrap">{formatLength(s.locatedFromEndM, unit)}</span> <span className="whitespace-nowrap">from {s.fromEnd}</span>
              </td>
              <td className="whitespace-nowrap pl-2 text-right">{formatLength(s.foundFromEndM, unit)}</td>
              <td className="whitespace-nowrap pl-2 text-right">{formatSignedLength(s.errorM, unit)}</td>
              <td className="pl-2 text-right">{s.withinWindow ? 'yes' : 'no'}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
