import { useState } from 'react';
import { Link } from 'react-router-dom';
import type { TraceListQuery } from '../../../shared/schemas/traces';
import { Button } from '../../components/ui/button';
import { Card, PageHeader } from '../../components/ui/card';
import { fieldErrors, SelectField, TextField } from '../../components/ui/field';
import { ApiError } from '../../lib/api-client';
import { ErrorNotice, Loading } from '../../components/ui/notice';
import { StatusBadge } from '../../components/ui/status-badge';
import { Pager } from '../../components/ui/pager';
import { useSession } from '../../features/auth/use-session';
import { useCableRuns } from '../../features/sites/api/list-cable-runs';
import { useSites } from '../../features/sites/api/list-sites';
import { useTraces } from '../../features/traces/api/list-traces';
import { ListSearch, NoMatches, searchError, useListSearch } from '../../features/findings/components/list-search';
import { ArchivedTraces } from '../../features/traces/components/archived-traces';
import { formatDateTime } from '../../lib/format';
import { paths } from '../paths';

type Sort = NonNullable<TraceListQuery['sort']>;

export function TracesPage() {
  const { user, can } = useSession();
  const { text, setText, search, clear } = useListSearch();
  const [state, setQ] = useState<TraceListQuery>({ page: 1, sort: 'createdAt', dir: 'desc' });
  // The page number belongs to the search it was chosen under: a new search starts at page 1.
  const q: TraceListQuery = { ...state, q: search || undefined, page: (state.q ?? '') === search ? state.page : 1 };
  const sites = useSites({ pageSize: 100 });
  const runs = useCableRuns({ siteId: q.siteId }, !!q.siteId);
  const traces = useTraces(q);
  const badSearch = searchError(traces.error);
  // A date range the server refused (the end before the start) is said under the date it names.
  const dateErrors = traces.error instanceof ApiError && traces.error.status === 400 ? fieldErrors(traces.error) : {};
  const badDates = dateErrors.from ?? dateErrors.to;
  const set = (patch: Partial<TraceListQuery>) => setQ({ ...q, page: 1, ...patch });
  const sortBy = (sort: Sort) => setQ({ ...q, sort, dir: q.sort === sort && q.dir === 'desc' ? 'asc' : 'desc' });
  const arrow = (s: Sort) => (q.sort === s ? (q.dir === 'asc' ? ' ▲' : ' ▼') : '');
  // On a phone the six filters would fill the first screen before any trace: they fold behind one button there
  // (open while a date the server refused needs fixing); from the small-tablet width up they always show.
  const [filtersOpen, setFiltersOpen] = useState(false);
  const filtersSet = [q.siteId, q.cableRunId, q.status, q.uploadedById, q.from, q.to].filter((v) => v !== undefined && v !== '').length;
  const showFilters = filtersOpen || !!badDates;

  return (
    <>
      <PageHeader
        title="Traces"
        subtitle="Every uploaded trace, readable or not, with what the engine made of it."
        actions={can('traces:upload') && <Link className="inline-flex min-h-11 items-center rounded-md bg-copper px-4 text-sm font-semibold text-white" to={paths.upload.to()}>Upload a trace</Link>}
      />
      <Card>
        <ListSearch label="Search traces" placeholder="File name" text={text} onText={setText} onClear={clear} error={badSearch} />
        <button
          type="button"
          className="mt-3 inline-flex min-h-11 items-center rounded-md border border-rule px-4 text-sm font-semibold text-ink-soft sm:hidden"
          aria-expanded={showFilters}
          aria-controls="trace-filters"
          onClick={() => setFiltersOpen(!showFilters)}
          data-testid="trace-filters-toggle"
        >
          {showFilters ? 'Hide the filters' : filtersSet ? `Filters (${filtersSet} set)` : 'Filters'}
        </button>
        <div id="trace-filters" className={`mt-3 gap-3 sm:grid sm:grid-cols-3 lg:grid-cols-6 ${showFilters ? 'grid' : 'hidden'}`}>
          <SelectField label="Site" value={q.siteId ?? ''} onChange={(e) => set({ siteId: e.target.value ? Number(e.target.value) : undefined, cableRunId: undefined })}>
            <option value="">All sites</option>
            {sites.data?.items.map((s) => (
              <option key={s.id} value={s.id}>
                {s.name}
              </option>
            ))}
          </SelectField>
          <SelectField label="Cable run" value={q.cableRunId ?? ''} disabled={!q.siteId} onChange={(e) => set({ cableRunId: e.target.value ? Number(e.target.value) : undefined })}>
            <option value="">All runs</option>
            {runs.data?.items.map((r) => (
              <option key={r.id} value={r.id}>
                {r.name}
              </option>
            ))}
          </SelectField>
          <SelectField label="Status" value={q.status ?? ''} onChange={(e) => set({ status: (e.target.value || undefined) as TraceListQuery['status'] })}>
            <option value="">Any</option>
            <option value="ok">Read</option>
            <option value="failed">Could not be read</option>
            <option value="pending">Analysing</option>
          </SelectField>
          <SelectField label="Uploaded by" value={q.uploadedById ? 'me' : ''} onChange={(e) => set({ uploadedById: e.target.value ? user.id : undefined })}>
            <option value="">Anyone</option>
            <option value="me">Me</option>
          </SelectField>
          <TextField label="From" type="date" value={q.from ?? ''} max={q.to} error={dateErrors.from} onChange={(e) => set({ from: e.target.value || undefined })} />
          <TextField label="To" type="date" value={q.to ?? ''} min={q.from} error={dateErrors.to} onChange={(e) => set({ to: e.target.value || undefined })} />
        </div>
        {traces.isPending ? (
          <Loading />
        ) : traces.error ? (
          badSearch || badDates ? null : <ErrorNotice error={traces.error} onRetry={() => void traces.refetch()} retrying={traces.isFetching} />
        ) : traces.data.items.length === 0 && search && !traces.isPlaceholderData ? (
          <NoMatches what="traces" search={search} />
        ) : (
          <>
            <ul className="mt-4 divide-y divide-rule sm:hidden">
              {traces.data.items.map((t) => (
                <li key={t.id}>
                  <Link to={paths.trace.to(t.id)} className="block min-h-11 py-3">
                    <span className="block break-all font-semibold text-teal underline">{t.originalName}</span>
                    <span className="block text-sm text-ink-soft">
                      {t.siteName} · {t.cableRunName} · end {t.end}
                    </span>
                    <span className="block text-sm">
                      {t.status === 'ok' ? `${t.eventCount} event${t.eventCount === 1 ? '' : 's'}${t.findingCount ? `, ${t.findingCount} decided` : ''}` : t.status === 'pending' ? 'Analysing…' : 'Could not be read'} ·{' '}
                      {formatDateTime(t.createdAt)}, {t.uploadedBy.name}
                    </span>
                  </Link>
                </li>
              ))}
            </ul>
            <div className="mt-4 hidden overflow-x-auto sm:block">
              <table className="w-full text-left text-sm">
                <thead className="text-xs uppercase text-mist">
                  <tr>
                    <th className="py-2">
                      <Button variant="ghost" onClick={() => sortBy('originalName')}>File{arrow('originalName')}</Button>
                    </th>
                    <th>Site · run</th>
                    <th>
                      <Button variant="ghost" onClick={() => sortBy('end')}>End{arrow('end')}</Button>
                    </th>
                    <th>
                      <Button variant="ghost" onClick={() => sortBy('status')}>Result{arrow('status')}</Button>
                    </th>
                    <th>
                      <Button variant="ghost" onClick={() => sortBy('createdAt')}>Uploaded{arrow('createdAt')}</Button>
                    </th>
                  </tr>
                </thead>
                <tbody>
                  {traces.data.items.map((t) => (
                    <tr key={t.id} className="border-t border-rule align-top">
                      <td className="py-2 pr-2">
                        <Link className="font-semibold text-teal underline" to={paths.trace.to(t.id)}>
                          {t.originalName}
                        </Link>
                        {t.isReference && (
                          <span className="ml-2">
                            <StatusBadge kind="trace" status="reference" />
                          </span>
                        )}
                      </td>
                      <td className="pr-2">
                        {t.siteName}
                        <span className="block text-xs text-mist">{t.cableRunName}</span>
                      </td>
                      <td className="pr-2">{t.end}</td>
                      <td className="pr-2">
                        {t.status === 'ok' ? (
                          <span className="tabular">
                            {t.eventCount} event{t.eventCount === 1 ? '' : 's'}
                            {t.findingCount ? `, ${t.findingCount} decided` : ''}
                          </span>
                        ) : (
                          <StatusBadge kind="trace" status={t.status} />
                        )}
                      </td>
                      <td className="tabular">
                        {formatDateTime(t.createdAt)}
                        <span className="block text-xs text-mist">{t.uploadedBy.name}</span>
                      </td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
            <Pager page={traces.data.page} pageSize={traces.data.pageSize} total={traces.data.total} onPage={(page) => setQ({ ...q, page })} />
          </>
        )}
      </Card>
      {can('traces:restore') && <ArchivedTraces traceLink={paths.trace.to} />}
    </>
  );
}
export default TracesPage;
