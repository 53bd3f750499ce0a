import { Link } from 'react-router-dom';
import { FINDING_KIND_LABELS } from '../../../../shared/schemas/findings';
import type { UnticketedFinding } from '../../../../shared/schemas/tickets';
import { paths } from '../../../app/paths';
import { Card } from '../../../components/ui/card';
import { formatDateTime, formatLength, type LengthUnit } from '../../../lib/format';

const kindLabel = (k: string) => FINDING_KIND_LABELS[k as keyof typeof FINDING_KIND_LABELS] ?? k;

/**
 * Confirmed findings no repair ticket covers yet, each with the step that gives it one: on the dashboard, and
 * first on a supervisor's start page, since raising the ticket is what they do next.
 */
export function UnticketedFindings({
  items,
  unit,
  canRaise,
  title = 'Confirmed findings without a ticket',
  limit,
}: {
  items: UnticketedFinding[];
  unit: LengthUnit;
  canRaise: boolean;
  title?: string;
  limit?: number;
}) {
  const shown = limit === undefined ? items : items.slice(0, limit);
  return (
    <Card title={`${title} (${items.length})`}>
      {items.length === 0 ? (
        <p className="text-sm text-mist">Every confirmed finding is on a ticket.</p>
      ) : (
        <>
          <ul className="space-y-2" data-testid="unticketed-findings">
            {shown.map((f) => (
              <li key={f.id} className="flex flex-wrap items-center justify-between gap-2 rounded border border-rule px-3 py-2">
                <span>
                  <Link to={paths.finding.to(f.id)} className="font-semibold text-teal underline">
                    {kindLabel(f.kind)} at {formatLength(f.distanceM, unit)} from end {f.measuredFrom}
                  </Link>
                  <span className="block text-xs text-mist">
                    {f.site.name} · {f.cableRun.name} · confirmed {formatDateTime(f.confirmedAt)} by {f.confirmedBy.name}
                  </span>
                </span>
                {canRaise && (
                  <Link
                    to={`${paths.tickets.to()}?finding=${f.id}`}
                    className="inline-flex min-h-11 items-center rounded-md bg-copper px-4 text-sm font-semibold text-white hover:bg-copper-dark"
                  >
                    Raise ticket
                  </Link>
                )}
              </li>
            ))}
          </ul>
          {shown.length < items.length && (
            <p className="mt-2 text-sm">
              <Link to={paths.dashboard.to()} className="font-semibold text-teal underline">
                All {items.length} on the dashboard
              </Link>
            </p>
          )}
        </>
      )}
    </Card>
  );
}
