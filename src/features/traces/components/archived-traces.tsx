import { useState } from 'react';
import { Link } from 'react-router-dom';
import { Card } from '../../../components/ui/card';
import { ErrorNotice, Loading } from '../../../components/ui/notice';
import { Pager } from '../../../components/ui/pager';
import { formatDateTime } from '../../../lib/format';
import { useArchivedTraces } from '../api/archive-trace';

/** Archived traces, for whoever may restore them: what, who archived it, when and why. */
export function ArchivedTraces({ traceLink }: { traceLink: (id: number) => string }) {
  const [page, setPage] = useState(1);
  const list = useArchivedTraces(page);
  return (
    <Card title="Archived traces" className="mt-4">
      <p className="mb-2 text-sm text-ink-soft">Left out of the list above but kept. Open one to restore it.</p>
      {list.isPending ? (
        <Loading />
      ) : list.error ? (
        <ErrorNotice error={list.error} onRetry={() => void list.refetch()} retrying={list.isFetching} />
      ) : list.data.total === 0 ? (
        <p className="text-sm text-mist">No archived traces.</p>
      ) : (
        <>
          <ul className="divide-y divide-rule" data-testid="archived-traces">
            {list.data.items.map((t) => (
              <li key={t.id}>
                <Link to={traceLink(t.id)} className="block min-h-11 py-3">
                  <span className="block break-all font-semibold text-teal underline">{t.originalName}</span>
                  <span className="block text-sm text-ink-soft">
                    {t.siteName} · {t.cableRunName} · end {t.end} ·{' '}
                    {t.status === 'ok' ? 'read' : t.status === 'pending' ? 'analysing' : 'could not be read'} · uploaded by{' '}
                    {t.uploadedBy.name}
                  </span>
                  <span className="block text-sm">
                    Archived by {t.archivedBy.name}, {formatDateTime(t.archivedAt)}: {t.reason}
                  </span>
                </Link>
              </li>
            ))}
          </ul>
          <Pager page={page} pageSize={list.data.pageSize} total={list.data.total} onPage={setPage} />
        </>
      )}
    </Card>
  );
}
