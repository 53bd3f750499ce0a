import { useEffect, useId, useRef, useState } from 'react';
import { useSearchParams } from 'react-router-dom';
import { ApiError } from '../../../lib/api-client';
import { fieldErrors } from '../../../components/ui/field';

/** How long typing must pause before the list is asked again. */
export const SEARCH_DEBOUNCE_MS = 300;

/**
 * A list's search text, kept in the page address as `?q=` so the browser's
 * back and forward buttons and a shared link bring the same search back.
 * `text` follows every key press; `search` is what the list is asked for,
 * written to the address once typing pauses for SEARCH_DEBOUNCE_MS.
 */
export function useListSearch() {
  const [params, setParams] = useSearchParams();
  const search = params.get('q') ?? '';
  const [text, setText] = useState(search);
  const pushed = useRef(search);

  // The address changed without us (back, forward, a shared link): show its search.
  useEffect(() => {
    if (search !== pushed.current) {
      pushed.current = search;
      setText(search);
    }
  }, [search]);

  const commit = (value: string) => {
    pushed.current = value;
    setParams(
      (prev) => {
        const next = new URLSearchParams(prev);
        if (value.trim()) next.set('q', value);
        else next.delete('q');
        return next;
      },
      { preventScrollReset: true },
    );
  };

  useEffect(() => {
    if (text === pushed.current) return;
    const timer = setTimeout(() => commit(text), SEARCH_DEBOUNCE_MS);
    return () => clearTimeout(timer);
    // commit only reads setParams, which is stable
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [text]);

  const clear = () => {
    setText('');
    commit('');
  };
  return { text, setText, search: search.trim(), clear };
}

/** The server's refusal of the search text itself (too long), for showing under the field. */
export function searchError(error: unknown): string | undefined {
  if (!(error instanceof ApiError) || error.status !== 400) return undefined;
  return fieldErrors(error).q;
}

/**
 * The search field above a list: tall enough for a gloved thumb, with its own
 * clear button, and the server's complaint about the text shown beneath it.
 */
export function ListSearch({
  label,
  placeholder,
  text,
  onText,
  onClear,
  error,
}: {
  label: string;
  placeholder?: string;
  text: string;
  onText: (value: string) => void;
  onClear: () => void;
  error?: string;
}) {
  const id = useId();
  return (
    <div className="space-y-1">
      <label htmlFor={id} className="block text-sm font-semibold text-ink-soft">
        {label}
      </label>
      <div className="flex gap-2">
        <input
          id={id}
          type="search"
          enterKeyHint="search"
          autoComplete="off"
          value={text}
          placeholder={placeholder}
          onChange={(e) => onText(e.target.value)}
          onKeyDown={(e) => {
            if (e.key === 'Escape' && text) {
              e.preventDefault();
              onClear();
            }
          }}
          aria-invalid={error ? true : undefined}
          aria-describedby={error ? `${id}-error` : undefined}
          className="block min-h-12 w-full min-w-0 rounded-md border border-rule bg-white px-3 py-2 text-lg text-ink shadow-inner aria-[invalid=true]:border-danger [&::-webkit-search-cancel-button]:hidden"
        />
        {text && (
          <button
            type="button"
            onClick={onClear}
            aria-label="Clear the search"
            className="inline-flex min-h-12 min-w-12 shrink-0 items-center justify-center rounded-md border border-rule bg-card px-3 text-base font-semibold text-ink hover:border-ink-soft"
          >
            Clear
          </button>
        )}
      </div>
      {error && (
        <p id={`${id}-error`} className="text-xs font-semibold text-danger">
          {error}
        </p>
      )}
    </div>
  );
}

/** The line a list shows when a search matched nothing. */
export function NoMatches({ what, search }: { what: string; search: string }) {
  return (
    <p className="mt-4 text-base text-ink-soft" role="status">
      No {what} match “{search}”
    </p>
  );
}
