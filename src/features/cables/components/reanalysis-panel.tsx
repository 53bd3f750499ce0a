import { Button } from '../../../components/ui/button';
import { ErrorNotice, Loading, Notice } from '../../../components/ui/notice';
import { countOf, formatDateTime, formatLength, type LengthUnit } from '../../../lib/format';
import { formatVf } from '../cable-format';
import { useLatestReanalysis, useStartReanalysis } from '../api/cable-reanalysis';

/**
 * Analyse again every current trace of this cable type with the library's
 * values, after a planner changed the VF or the loss. The run goes on in the
 * background (on any instance); this panel follows it with a progress bar
 * and sums up how far the findings made from those traces moved.
 */
export function ReanalysisPanel({ cableId, revision, unit, canStart }: { cableId: number; revision: number; unit: LengthUnit; canStart: boolean }) {
  const latest = useLatestReanalysis(cableId);
  const start = useStartReanalysis(cableId);
  if (latest.isPending) return <Loading />;
  if (latest.error) return <ErrorNotice error={latest.error} onRetry={() => void latest.refetch()} retrying={latest.isFetching} />;
  const r = latest.data.reanalysis;
  const running = r?.status === 'running';
  const percent = r && r.traceTotal > 0 ? Math.round((100 * r.tracesDone) / r.traceTotal) : 100;
  return (
    <div data-testid="cable-reanalysis" className="space-y-3 text-sm">
      <p className="text-ink-soft">
        After the velocity factor or the loss changes, analyse every current trace of this cable type again with revision {revision}. Each trace keeps its earlier
        analysis as the record of the day; the new one is added beside it.
      </p>
      {r && (
        <div className="space-y-2">
          <div className="flex items-baseline justify-between gap-2">
            <span className="font-semibold">{running ? 'Analysing again…' : 'Last run'}</span>
            <span className="tabular text-ink-soft">
              {r.tracesDone} of {countOf(r.traceTotal, 'trace')}
            </span>
          </div>
          <div
            role="progressbar"
            aria-label="Traces analysed again"
            aria-valuemin={0}
            aria-valuemax={r.traceTotal}
            aria-valuenow={r.tracesDone}
            className="h-3 w-full overflow-hidden rounded-full bg-rule/60"
          >
            <div className={`h-full ${running ? 'bg-copper' : 'bg-ok'}`} style={{ width: `${percent}%` }} />
          </div>
          <p className="text-ink-soft">
            Started {formatDateTime(r.startedAt)} by {r.requestedBy.name} with VF {formatVf(r.vf, 4)} (revision {r.cableTypeRevision})
            {r.finishedAt ? `; finished ${formatDateTime(r.finishedAt)}` : ''}.
          </p>
          {!running && (
            <dl data-testid="cable-reanalysis-summary" className="tabular grid grid-cols-[auto_1fr] gap-x-4 gap-y-1">
              <dt className="text-ink-soft">Traces</dt>
              <dd>
                {r.traceTotal === 0
                  ? 'none needed it: every current trace already uses these values'
                  : `${r.tracesOk} analysed again${r.tracesFailed ? `, ${r.tracesFailed} unreadable this time` : ''}${r.tracesSkipped ? `, ${r.tracesSkipped} skipped (stored file missing or changed)` : ''}`}
              </dd>
              <dt className="text-ink-soft">Findings</dt>
              <dd>
                {r.findings === 0
                  ? 'no findings were made from these traces'
                  : `${r.findingsMoved} of ${r.findings} moved by ${formatLength(r.movedThresholdM, unit)} or more${r.findingsUnmatched ? `; ${r.findingsUnmatched} no longer found` : ''}`}
              </dd>
              {r.maxShiftM !== null && (
                <>
                  <dt className="text-ink-soft">Moved by</dt>
                  <dd>
                    up to {formatLength(r.maxShiftM, unit)}, {formatLength(r.meanShiftM, unit)} on average
                  </dd>
                </>
              )}
            </dl>
          )}
          {!running && r.findingsMoved > 0 && (
            <Notice tone="warn">Findings that moved may point crews to a different spot: check open tickets on these runs before anyone digs.</Notice>
          )}
        </div>
      )}
      {start.error && <ErrorNotice error={start.error} />}
      {canStart && (
        <Button variant="secondary" disabled={running || start.isPending} onClick={() => start.mutate()}>
          {running ? 'Running…' : 'Analyse all traces again'}
        </Button>
      )}
    </div>
  );
}
