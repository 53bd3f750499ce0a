import { useState } from 'react';
import { Link, useParams } from 'react-router-dom';
import { markerPhrase, routeLengthM } from '../../../shared/field/route-position';
import { Button } from '../../components/ui/button';
import { Card, PageHeader } from '../../components/ui/card';
import { ErrorNotice, Loading } from '../../components/ui/notice';
import { StatusBadge } from '../../components/ui/status-badge';
import { useSession } from '../../features/auth/use-session';
import { useCableRun } from '../../features/sites/api/get-cable-run';
import { MarkerEditor } from '../../features/sites/components/marker-editor';
import { RunForm } from '../../features/sites/components/run-form';
import { useTraces } from '../../features/traces/api/list-traces';
import { formatDateTime, formatLength, markerKindTitle } from '../../lib/format';
import { paths } from '../paths';

export function SiteRunPage() {
  const params = useParams();
  const id = Number(params.runId);
  const { can, unit } = useSession();
  const run = useCableRun(id);
  const traces = useTraces({ cableRunId: id, pageSize: 10 });
  const [editing, setEditing] = useState(false);
  if (run.isPending) return <Loading what="Loading the cable run" />;
  if (run.error || !run.data) return <ErrorNotice error={run.error} onRetry={() => void run.refetch()} retrying={run.isFetching} />;
  const r = run.data;
  return (
    <>
      <PageHeader
        title={r.name}
        subtitle={
          <>
            <Link className="text-teal underline" to={paths.site.to(r.siteId)}>
              {r.siteName}
            </Link>{' '}
            · {r.endALabel} (A) → {r.endBLabel} (B)
          </>
        }
        actions={
          <>
            {can('traces:upload') && (
              <Link className="inline-flex min-h-11 items-center rounded-md bg-copper px-4 text-sm font-semibold text-white" to={`${paths.upload.to()}?site=${r.siteId}&run=${r.id}`}>
                Upload a trace of this run
              </Link>
            )}
            {can('sites:write') && (
              <Button variant="secondary" onClick={() => setEditing(!editing)}>
                {editing ? 'Close' : 'Edit run'}
              </Button>
            )}
          </>
        }
      />
      <div className="grid grid-cols-1 gap-4 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
        <div className="space-y-4">
          {editing && (
            <Card title="Edit cable run">
              <RunForm siteId={r.siteId} run={r} unit={unit} onSaved={() => setEditing(false)} />
            </Card>
          )}
          <Card title="Route markers">
            <p className="mb-3 text-sm text-ink-soft">
              Chainage is the distance along the route from end A; slack is extra cable coiled at the marker, which the trace sees but the route does not. Route
              length {formatLength(routeLengthM(r), unit)} = installed {formatLength(r.installedLengthM, unit)} less slack.
            </p>
            {can('sites:write') ? (
              <MarkerEditor key={r.id} run={r} unit={unit} />
            ) : (
              <table className="w-full text-left text-sm tabular">
                <thead className="text-xs uppercase text-mist">
                  <tr>
                    <th className="py-2">Marker</th>
                    <th>Chainage</th>
                    <th>Slack</th>
                  </tr>
                </thead>
                <tbody>
                  {r.markers.map((m) => (
                    <tr key={m.id} className="border-t border-rule">
                      <td className="py-2">
                        {markerPhrase(markerKindTitle(m.kind), m.label)}
                      </td>
                      <td>{formatLength(m.chainageM, unit)}</td>
                      <td>{formatLength(m.slackM, unit)}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            )}
          </Card>
        </div>
        <div className="space-y-4">
          <Card title="Cable">
            <p className="font-semibold">{r.cableType.name}</p>
            <p className="text-sm tabular">
              VF {r.cableType.vf} ± {(r.cableType.vfTolerance * 100).toFixed(1)} % · Z0 {r.cableType.z0Ohm} Ω · installed {formatLength(r.installedLengthM, unit)}
            </p>
          </Card>
          <Card title="Recent traces">
            <ul className="divide-y divide-rule text-sm">
              {traces.data?.items.map((t) => (
                <li key={t.id} className="py-2">
                  <Link className="font-semibold text-teal underline" to={paths.trace.to(t.id)}>
                    {t.originalName}
                  </Link>{' '}
                  from {t.end} {t.isReference && <StatusBadge kind="trace" status="reference" />} {t.status !== 'ok' && <StatusBadge kind="trace" status={t.status} />}
                  <span className="block text-xs text-mist">{formatDateTime(t.createdAt)}</span>
                </li>
              ))}
              {traces.data?.items.length === 0 && <li className="py-2 text-mist">No traces yet.</li>}
            </ul>
          </Card>
        </div>
      </div>
    </>
  );
}
export default SiteRunPage;
