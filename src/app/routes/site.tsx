import { useState } from 'react';
import { Link, useNavigate, useParams } from 'react-router-dom';
import { Button } from '../../components/ui/button';
import { Card, PageHeader } from '../../components/ui/card';
import { ErrorNotice, Loading } from '../../components/ui/notice';
import { useSession } from '../../features/auth/use-session';
import { useSite } from '../../features/sites/api/get-site';
import { useCableRuns } from '../../features/sites/api/list-cable-runs';
import { RunForm } from '../../features/sites/components/run-form';
import { SiteForm } from '../../features/sites/components/site-form';
import { countOf, formatLength } from '../../lib/format';
import { paths } from '../paths';

export function SitePage() {
  const id = Number(useParams().siteId);
  const { can, unit } = useSession();
  const navigate = useNavigate();
  const site = useSite(id);
  const runs = useCableRuns({ siteId: id });
  const [editing, setEditing] = useState(false);
  if (site.isPending) return <Loading what="Loading the site" />;
  if (site.error || !site.data) return <ErrorNotice error={site.error} onRetry={() => void site.refetch()} retrying={site.isFetching} />;
  const s = site.data;
  return (
    <>
      <PageHeader
        title={s.name}
        subtitle={s.address ?? 'No address recorded'}
        actions={
          <>
            {can('traces:upload') && (
              <Link className="inline-flex min-h-11 items-center rounded-md bg-copper px-4 text-sm font-semibold text-white" to={`${paths.upload.to()}?site=${s.id}`}>
                Upload a trace here
              </Link>
            )}
            {can('sites:write') && (
              <Button variant="secondary" onClick={() => setEditing(!editing)}>
                {editing ? 'Close' : 'Edit site'}
              </Button>
            )}
          </>
        }
      />
      <div className="grid grid-cols-1 gap-4 lg:grid-cols-[minmax(0,2fr)_minmax(0,1fr)]">
        <div className="space-y-4">
          {editing && (
            <Card title="Edit site">
              <SiteForm site={s} onSaved={() => setEditing(false)} />
            </Card>
          )}
          <Card title="Cable runs">
            {runs.isPending ? (
              <Loading />
            ) : (
              <ul className="divide-y divide-rule">
                {runs.data?.items.map((r) => (
                  <li key={r.id}>
                    <Link to={paths.siteRun.to(s.id, r.id)} className="block min-h-11 py-3 hover:bg-paper">
                      <span className="font-semibold text-teal underline">{r.name}</span>
                      <span className="block text-sm text-ink-soft">
                        {r.endALabel} → {r.endBLabel} · {formatLength(r.installedLengthM, unit)} of {r.cableType.name} · {countOf(r.markers.length, 'route marker')}
                      </span>
                    </Link>
                  </li>
                ))}
                {runs.data?.items.length === 0 && <li className="py-3 text-sm text-mist">No cable runs recorded yet.</li>}
              </ul>
            )}
          </Card>
          {can('sites:write') && (
            <Card title="New cable run">
              <RunForm siteId={s.id} unit={unit} onSaved={(r) => navigate(paths.siteRun.to(s.id, r.id))} />
            </Card>
          )}
        </div>
        <div className="space-y-4">
          <Card title="Access">
            <p className="whitespace-pre-wrap text-sm">{s.accessNotes ?? 'No access notes.'}</p>
            {s.latitude !== null && s.longitude !== null && (
              <p className="mt-2 text-sm tabular">
                {s.latitude.toFixed(5)}, {s.longitude.toFixed(5)}
              </p>
            )}
          </Card>
          <Card title="Supervisors responsible">
            <ul className="text-sm">
              {s.supervisors.map((u) => (
                <li key={u.id}>
                  {u.name} · <a className="text-teal underline" href={`mailto:${u.email}`}>{u.email}</a>
                  {!u.active && <span className="text-xs font-semibold text-warn"> · no longer a supervisor: gets no e-mail from this site</span>}
                </li>
              ))}
              {/* The finding e-mail's own rule (server/tickets/tickets.mail.ts): with no one here to receive it, every supervisor does. */}
              {!s.supervisors.some((u) => u.active) && (
                <li className={s.supervisors.length ? 'mt-2 text-ink-soft' : 'text-ink-soft'} data-testid="site-mail-fallback">
                  {s.supervisors.length ? 'None of them gets e-mail now' : 'Nobody named yet'}: a finding confirmed here is e-mailed to every supervisor.
                </li>
              )}
            </ul>
          </Card>
          <Card title="Findings">
            <Link className="text-teal underline" to={paths.findings.to()}>
              {countOf(s.openFindingCount, 'confirmed finding')}
            </Link>
          </Card>
        </div>
      </div>
    </>
  );
}
export default SitePage;
