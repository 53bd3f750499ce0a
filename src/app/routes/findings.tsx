import { useState } from 'react';
import { Link } from 'react-router-dom';
import { FINDING_KIND_LABELS, type FindingListQuery } from '../../../shared/schemas/findings';
import { Button } from '../../components/ui/button';
import { Card, PageHeader } from '../../components/ui/card';
import { SelectField } from '../../components/ui/field';
import { ErrorNotice, Loading } from '../../components/ui/notice';
import { StatusBadge } from '../../components/ui/status-badge';
import { Pager } from '../../components/ui/pager';
import { useSession } from '../../features/auth/use-session';
import { useFindings } from '../../features/findings/api/list-findings';
import { useSites } from '../../features/sites/api/list-sites';
import { ListSearch, NoMatches, searchError, useListSearch } from '../../features/findings/components/list-search';
import { RouteSentence } from '../../features/findings/components/where-to-dig';
import { TicketLink } from '../../features/tickets/components/ticket-link';
import { formatDateTime, formatLength } from '../../lib/format';
import { paths } from '../paths';

type Sort = NonNullable<FindingListQuery['sort']>;

export function FindingsPage() {
  const { unit } = useSession();
  const { text, setText, search, clear } = useListSearch();
  const [state, setQ] = useState<FindingListQuery>({ page: 1, status: 'confirmed', sort: 'confirmedAt', dir: 'desc' });
  // The page number belongs to the search it was chosen under: a new search starts at page 1.
  const q: FindingListQuery = { ...state, q: search || undefined, page: (state.q ?? '') === search ? state.page : 1 };
  const sites = useSites({ pageSize: 100 });
  const findings = useFindings(q);
  const badSearch = searchError(findings.error);
  const set = (patch: Partial<FindingListQuery>) => setQ({ ...q, page: 1, ...patch });
  const sortBy = (sort: Sort) => setQ({ ...q, sort, dir: q.sort === sort && q.dir === 'desc' ? 'asc' : 'desc' });
  const arrow = (s: Sort) => (q.sort === s ? (q.dir === 'asc' ? ' ▲' : ' ▼') : '');
  return (
    <>
      <PageHeader title="Findings" subtitle="Events confirmed as faults (or dismissed), with where to dig." />
      <Card>
        <ListSearch
          label="Search findings"
          placeholder="Site, run, marker, kind or note"
          text={text}
          onText={setText}
          onClear={clear}
          error={badSearch}
        />
        <div className="mt-3 grid gap-3 sm:grid-cols-2 lg:grid-cols-4">
          <SelectField label="Site" value={q.siteId ?? ''} onChange={(e) => set({ siteId: e.target.value ? Number(e.target.value) : undefined })}>
            <option value="">All sites</option>
            {sites.data?.items.map((s) => (
              <option key={s.id} value={s.id}>
                {s.name}
              </option>
            ))}
          </SelectField>
          <SelectField label="Status" value={q.status ?? ''} onChange={(e) => set({ status: (e.target.value || undefined) as FindingListQuery['status'] })}>
            <option value="confirmed">Confirmed faults</option>
            <option value="dismissed">Dismissed</option>
            <option value="">Both</option>
          </SelectField>
        </div>
        <div className="mt-3 flex flex-wrap gap-2 text-sm">
          Sort:
          <Button variant="ghost" onClick={() => sortBy('confirmedAt')}>Date{arrow('confirmedAt')}</Button>
          <Button variant="ghost" onClick={() => sortBy('distanceM')}>Distance{arrow('distanceM')}</Button>
          <Button variant="ghost" onClick={() => sortBy('status')}>Status{arrow('status')}</Button>
        </div>
        {findings.isPending ? (
          <Loading />
        ) : findings.error ? (
          badSearch ? null : <ErrorNotice error={findings.error} onRetry={() => void findings.refetch()} retrying={findings.isFetching} />
        ) : findings.data.items.length === 0 && search && !findings.isPlaceholderData ? (
          <NoMatches what="findings" search={search} />
        ) : (
          <>
            <ul className="mt-2 divide-y divide-rule">
              {findings.data.items.map((f) => (
                <li key={f.id} className="py-3">
                  <Link to={paths.finding.to(f.id)} className="block min-h-11 rounded-md hover:bg-paper">
                    <span className="flex flex-wrap items-baseline justify-between gap-2">
                      <span className="font-semibold">
                        {f.siteName} · {f.cableRunName}
                      </span>
                      <span className="text-2xl font-bold tabular">{formatLength(f.distanceM, unit)}</span>
                    </span>
                    <span className="block text-sm text-ink-soft">
                      <StatusBadge kind="finding" status={f.status} /> {FINDING_KIND_LABELS[f.kind as keyof typeof FINDING_KIND_LABELS] ?? f.kind} · from end {f.end} ·{' '}
                      {f.confirmedBy.name}, {formatDateTime(f.confirmedAt)}
                    </span>
                    <span className="block text-sm">
                      <RouteSentence pos={f.routePosition} storedText={f.routePositionText} unit={unit} testId="finding-route" />
                    </span>
                  </Link>
                  {/* The repair under way for it, one tap from the list (its own link: a link cannot hold another). */}
                  {(f.tickets ?? []).map((t) => (
                    <TicketLink key={t.id} ticket={t} look="inline" testId="finding-row-ticket" />
                  ))}
                  {f.status === 'confirmed' && f.tickets?.length === 0 && (
                    <span className="block text-sm text-ink-soft" data-testid="finding-row-no-ticket">
                      No repair ticket yet
                    </span>
                  )}
                </li>
              ))}
            </ul>
            <Pager page={findings.data.page} pageSize={findings.data.pageSize} total={findings.data.total} onPage={(page) => setQ({ ...q, page })} />
          </>
        )}
      </Card>
    </>
  );
}
export default FindingsPage;
