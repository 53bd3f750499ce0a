import type { BestLocationView } from '../../../../shared/schemas/measurements';
import type { TicketDetail } from '../../../../shared/schemas/tickets';
import type { LengthUnit } from '../../../lib/format';
import { BestLocationHeadline, LocationMethods } from './best-location';

/**
 * The best locations a ticket's findings give, each once: findings of the
 * same fault (from both ends, say) share one.
 */
export function distinctBestLocations(t: TicketDetail): Array<{ best: BestLocationView; findingIds: number[] }> {
  const groups: Array<{ key: string; best: BestLocationView; findingIds: number[] }> = [];
  for (const f of t.findings) {
    if (!f.bestLocation) continue;
    const key = f.bestLocation.methods
      .map((m) => m.id)
      .sort()
      .join('|');
    const same = groups.find((g) => g.key === key);
    if (same) same.findingIds.push(f.id);
    else groups.push({ key, best: f.bestLocation, findingIds: [f.id] });
  }
  return groups.map(({ best, findingIds }) => ({ best, findingIds }));
}

/** Where to dig on a ticket or its crew sheet: each fault's best location and the readings behind it. */
export function TicketLocations({ t, unit, methods = true }: { t: TicketDetail; unit: LengthUnit; methods?: boolean }) {
  const groups = distinctBestLocations(t);
  const run = { ...t.cableRun, markers: t.cableRun.markers.map((m) => ({ ...m, kind: m.kind as never })) };
  return (
    <div className="space-y-4">
      {groups.map((g) => (
        <div key={g.findingIds.join('-')} className="space-y-3 break-inside-avoid">
          {groups.length > 1 && <p className="text-sm font-semibold">Finding {g.findingIds.join(' and ')}</p>}
          <BestLocationHeadline best={g.best} run={run} unit={unit} fileStem={`ticket-${t.id}-location`} />
          {methods && (
            <details className="rounded-md border border-rule p-3 print:border-0 print:p-0" open>
              <summary className="cursor-pointer text-sm font-semibold print:list-none">The readings behind it</summary>
              <div className="mt-2">
                <LocationMethods best={g.best} unit={unit} />
              </div>
            </details>
          )}
        </div>
      ))}
    </div>
  );
}
