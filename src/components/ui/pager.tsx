import { Button } from './button';

export function Pager({
  page,
  pageSize,
  total,
  onPage,
}: {
  page: number;
  pageSize: number;
  total: number;
  onPage: (p: number) => void;
}) {
  const pages = Math.max(1, Math.ceil(total / pageSize));
  return (
    <nav className="mt-3 flex items-center justify-between gap-2 text-sm" aria-label="Pages">
      <span className="text-mist tabular">
        {total === 0 ? 'Nothing to show' : `${(page - 1) * pageSize + 1}–${Math.min(total, page * pageSize)} of ${total}`}
      </span>
      {/* Everything on one page: no page buttons to press (disabled ones looked almost pressable). */}
      {pages > 1 && (
        <span className="flex gap-2">
          <Button variant="secondary" disabled={page <= 1} onClick={() => onPage(page - 1)}>
            Previous
          </Button>
          <Button variant="secondary" disabled={page >= pages} onClick={() => onPage(page + 1)}>
            Next
          </Button>
        </span>
      )}
    </nav>
  );
}
