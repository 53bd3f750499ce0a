import { useState } from 'react';
import { Link, useNavigate } from 'react-router-dom';
import { Card, PageHeader } from '../../components/ui/card';
import { TextField } from '../../components/ui/field';
import { ErrorNotice, Loading } from '../../components/ui/notice';
import { Pager } from '../../components/ui/pager';
import { useSession } from '../../features/auth/use-session';
import { useSites } from '../../features/sites/api/list-sites';
import { SiteForm } from '../../features/sites/components/site-form';
import { paths } from '../paths';

export function SitesPage() {
  const { can } = useSession();
  const navigate = useNavigate();
  const [q, setQ] = useState('');
  const [page, setPage] = useState(1);
  const sites = useSites({ q, page });
  return (
    <>
      <PageHeader title="Sites" subtitle="Where the cables are, who is responsible, and how to get in." />
      <div className="grid grid-cols-1 gap-4 lg:grid-cols-[minmax(0,2fr)_minmax(0,1fr)]">
        <Card>
          <TextField label="Search by name or address" value={q} onChange={(e) => (setQ(e.target.value), setPage(1))} />
          {sites.isPending ? (
            <Loading />
          ) : sites.error ? (
            <ErrorNotice error={sites.error} onRetry={() => void sites.refetch()} retrying={sites.isFetching} />
          ) : (
            <>
              <ul className="mt-3 divide-y divide-rule">
                {sites.data.items.map((s) => (
                  <li key={s.id}>
                    <Link to={paths.site.to(s.id)} className="block min-h-11 py-3 hover:bg-paper">
                      <span className="font-semibold text-teal underline">{s.name}</span>
                      <span className="block text-sm text-ink-soft">
                        {s.address ?? 'No address'} · {s.cableRunCount} cable run{s.cableRunCount === 1 ? '' : 's'} · {s.openFindingCount} confirmed finding
                        {s.openFindingCount === 1 ? '' : 's'}
                      </span>
                    </Link>
                  </li>
                ))}
              </ul>
              <Pager page={sites.data.page} pageSize={sites.data.pageSize} total={sites.data.total} onPage={setPage} />
            </>
          )}
        </Card>
        {can('sites:write') && (
          <Card title="New site">
            <SiteForm onSaved={(s) => navigate(paths.site.to(s.id))} />
          </Card>
        )}
      </div>
    </>
  );
}
export default SitesPage;
