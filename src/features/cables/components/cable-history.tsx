import type { CableTypeChangeView } from '../../../../shared/schemas/cables';
import { Badge } from '../../../components/ui/notice';
import { formatDateTime, type LengthUnit } from '../../../lib/format';
import { FIELD_LABELS, formatFieldValue } from '../cable-format';

const KIND_LABEL: Record<CableTypeChangeView['kind'], string> = {
  create: 'Added',
  update: 'Edited',
  import: 'Imported',
  calibration: 'Calibration accepted',
};

/** Who changed what, when and why; newest first. */
export function CableHistory({ entries, unit }: { entries: CableTypeChangeView[]; unit: LengthUnit }) {
  if (entries.length === 0) return <p className="text-sm text-mist">No changes recorded.</p>;
  return (
    <ol className="space-y-3" aria-label="History">
      {entries.map((h) => (
        <li key={h.id} className="rounded-md border border-rule p-3" data-testid="history-entry">
          <div className="flex flex-wrap items-baseline justify-between gap-2">
            <p className="text-sm">
              <Badge tone={h.kind === 'calibration' ? 'ok' : h.kind === 'create' ? 'plain' : 'info'}>{KIND_LABEL[h.kind]}</Badge>{' '}
              <span className="font-semibold">{h.changedBy?.name ?? 'Rholog'}</span>
              <span className="text-mist"> · {formatDateTime(h.createdAt)} · revision {h.revision}</span>
            </p>
          </div>
          <p className="mt-1 text-sm">
            <span className="text-mist">Why: </span>
            {h.reason}
          </p>
          {h.kind !== 'create' && h.changes.length > 0 && (
            <ul className="mt-2 space-y-0.5 text-sm">
              {h.changes.map((c) => (
                <li key={c.field} className="tabular">
                  <span className="font-semibold">{FIELD_LABELS[c.field] ?? c.field}:</span>{' '}
                  <span className="text-mist line-through decoration-rule">{formatFieldValue(c.field, c.from, unit)}</span> →{' '}
                  <span>{formatFieldValue(c.field, c.to, unit)}</span>
                </li>
              ))}
            </ul>
          )}
        </li>
      ))}
    </ol>
  );
}
