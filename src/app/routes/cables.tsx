import { useEffect, useState } from 'react';
import { Link } from 'react-router-dom';
import type { CableSort } from '../../../shared/schemas/cables';
import { Card, PageHeader } from '../../components/ui/card';
import { TextField } from '../../components/ui/field';
import { ErrorNotice, Loading } from '../../components/ui/notice';
import { StatusBadge } from '../../components/ui/status-badge';
import { Pager } from '../../components/ui/pager';
import { useSession } from '../../features/auth/use-session';
import { CABLE_EXPORT_URL } from '../../features/cables/api/import-cables';
import { useCables } from '../../features/cables/api/list-cables';
import { constructionLabel, formatDelay, formatTolerance, formatVf, vfSourceLabel } from '../../features/cables/cable-format';
import { paths } from '../paths';

const COLUMNS: Array<{ key: CableSort | null; label: string; className?: string }> = [
  { key: 'name', label: 'Name' },
  // On a phone the name, VF and delay matter most; the rest shows on wider screens.
  { key: 'construction', label: 'Construction', className: 'hidden md:table-cell' },
  { key: 'dielectric', label: 'Dielectric', className: 'hidden xl:table-cell' },
  { key: 'z0Ohm', label: 'Z0', className: 'hidden sm:table-cell text-right' },
  { key: 'vf', label: 'VF', className: 'text-right' },
  { key: null, label: 'Delay', className: 'hidden sm:table-cell text-right' },
  { key: 'vfSource', label: 'Source', className: 'hidden md:table-cell' },
];

const linkButton = 'inline-flex min-h-11 items-center rounded-md px-4 text-sm font-semibold';

/** The library: searched, sorted and paged on the server. */
export function CablesPage() {
  const { can, unit } = useSession();
  const [typed, setTyped] = useState('');
  const [q, setQ] = useState('');
  const [page, setPage] = useState(1);
  const [sort, setSort] = useState<CableSort>('name');
  const [dir, setDir] = useState<'asc' | 'desc'>('asc');
  useEffect(() => {
    const t = setTimeout(() => (setQ(typed.trim()), setPage(1)), 250);
    return () => clearTimeout(t);
  }, [typed]);
  const cables = useCables({ q, page, sort, dir, pageSize: 25 });

  const sortBy = (key: CableSort) => {
    if (key === sort) {
      setDir(dir === 'asc' ? 'desc' : 'asc');
    } else {
      setSort(key);
      setDir('asc');
    }
    setPage(1);
  };

  return (
    <>
      <PageHeader
        title="Cable library"
        subtitle="Velocity factors, their tolerance and where they come from, for every cable type a run can use."
        actions={
          <>
            {can('cables:write') && (
              <Link to={paths.cableNew.to()} className={`${linkButton} bg-copper text-white hover:bg-copper-dark`}>
                New cable type
              </Link>
            )}
            <Link to={paths.cableCalculator.to()} className={`${linkButton} border border-rule bg-card hover:border-ink-soft`}>
              Calculator
            </Link>
            {can('cables:write') && (
              <Link to={paths.cableImport.to()} className={`${linkButton} border border-rule bg-card hover:border-ink-soft`}>
                Import CSV
              </Link>
            )}
            <a href={CABLE_EXPORT_URL} download className={`${linkButton} border border-rule bg-card hover:border-ink-soft`}>
              Export CSV
            </a>
          </>
        }
      />
      <Card>
        <TextField label="Search by name, dielectric, construction or reference" value={typed} onChange={(e) => setTyped(e.target.value)} type="search" />
        {cables.isPending ? (
          <Loading />
        ) : cables.error ? (
          <ErrorNotice error={cables.error} onRetry={() => void cables.refetch()} retrying={cables.isFetching} />
        ) : (
          <>
            <div className="mt-3 overflow-x-auto">
              <table className="w-full text-left text-sm" aria-label="Cable types">
                <thead className="text-xs uppercase text-mist">
                  <tr>
                    {COLUMNS.map((c) => (
                      <th
                        key={c.label}
                        className={`py-2 pr-3 ${c.className ?? ''}`}
                        aria-sort={c.key && c.key === sort ? (dir === 'asc' ? 'ascending' : 'descending') : undefined}
                      >
                        {c.key ? (
                          <button type="button" onClick={() => sortBy(c.key!)} className="min-h-11 min-w-11 font-semibold uppercase hover:text-copper">
                            {c.label}
                            {c.key === sort ? (dir === 'asc' ? ' ▲' : ' ▼') : ''}
                          </button>
                        ) : (
                          c.label
                        )}
                      </th>
                    ))}
                  </tr>
                </thead>
                <tbody>
                  {cables.data.items.map((c) => (
                    <tr key={c.id} className="border-t border-rule">
                      <td className="py-2 pr-3">
                        <Link to={paths.cable.to(c.id)} className="font-semibold text-teal hover:underline">
                          {c.name}
                        </Link>
                      </td>
                      <td className="hidden pr-3 md:table-cell">{constructionLabel(c.construction)}</td>
                      <td className="hidden pr-3 xl:table-cell">{c.dielectric}</td>
                      <td className="hidden whitespace-nowrap pr-3 text-right tabular sm:table-cell">{c.z0Ohm} Ω</td>
                      <td className="whitespace-nowrap pr-3 text-right tabular">
                        {formatVf(c.vf)} <span className="block text-xs text-mist sm:inline">{formatTolerance(c.vfTolerance)}</span>
                      </td>
                      <td className="hidden whitespace-nowrap pr-3 text-right tabular sm:table-cell">{formatDelay(c.vf, unit)}</td>
                      <td className="hidden whitespace-nowrap pr-3 md:table-cell">
                        <StatusBadge kind="vfSource" status={c.vfSource} label={vfSourceLabel(c.vfSource)} />
                      </td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
            {cables.data.total === 0 && <p className="py-4 text-sm text-mist">{q ? `No cable type matches “${q}”.` : 'The library is empty.'}</p>}
            <Pager page={page} pageSize={cables.data.pageSize} total={cables.data.total} onPage={setPage} />
          </>
        )}
      </Card>
    </>
  );
}
export default CablesPage;
