import { useEffect, useId, useLayoutEffect, useRef, useState, type ReactNode } from 'react';
import { TERMS, type TermKey } from '../../lib/terms';

/**
 * A trade term with its meaning one tap away: the term is a button (dotted
 * underline and a small "?" drawn by CSS, so the text itself reads as
 * before), and tapping it opens a short explanation in plain words under it,
 * kept inside the screen. Its touch area reaches past the text, for gloved
 * thumbs, without spreading the lines. Tapping it again, tapping anywhere
 * else (the explanation too) or Escape closes it. The touch area is at least
 * 44 px tall (the look's rule for gloved hands), whatever the term's font size.
 */
export function Term({ k, children }: { k: TermKey; children?: ReactNode }) {
  const term = TERMS[k];
  const [open, setOpen] = useState(false);
  const [shift, setShift] = useState(0);
  const id = useId();
  const box = useRef<HTMLSpanElement>(null);
  const button = useRef<HTMLButtonElement>(null);

  useLayoutEffect(() => {
    if (!open || !box.current) return;
    // Measured once as it opens (unshifted): keep it inside the screen, 8 px from either edge.
    const r = box.current.getBoundingClientRect();
    const width = document.documentElement.clientWidth || window.innerWidth;
    if (!(width > 0 && r.width > 0)) return;
    let dx = 0;
    if (r.right > width - 8) dx = width - 8 - r.right;
    if (r.left + dx < 8) dx = 8 - r.left;
    setShift(dx);
  }, [open]);

  useEffect(() => {
    if (!open) return;
    const away = (e: PointerEvent) => {
      // Any tap but the term's own closes it, the explanation included: it never stands over what is under it.
      if (!button.current?.contains(e.target as Node)) setOpen(false);
    };
    const key = (e: KeyboardEvent) => {
      if (e.key === 'Escape') {
        setOpen(false);
        button.current?.focus();
      }
    };
    document.addEventListener('pointerdown', away);
    document.addEventListener('keydown', key);
    return () => {
      document.removeEventListener('pointerdown', away);
      document.removeEventListener('keydown', key);
    };
  }, [open]);

  return (
    <span className="relative" data-term={k}>
      <button
        ref={button}
        type="button"
        aria-expanded={open}
        aria-controls={open ? id : undefined}
        title={`What “${term.name}” means`}
        onClick={() => {
          setShift(0);
          setOpen((o) => !o);
        }}
        className="relative cursor-help text-left font-[inherit] underline decoration-teal decoration-dotted underline-offset-4 before:absolute before:-inset-x-1 before:bottom-[min(-0.75rem,calc(50%-22px))] before:top-[min(-0.75rem,calc(50%-22px))] before:content-[''] after:ml-0.5 after:inline-flex after:h-4 after:w-4 after:items-center after:justify-center after:rounded-full after:bg-teal-light after:align-text-top after:text-[0.6875rem] after:font-bold after:leading-none after:text-teal after:content-['?'_/_'']"
      >
        {children ?? term.name}
      </button>
      {open && (
        <span
          ref={box}
          id={id}
          role="note"
          aria-label={term.name}
          style={{ transform: shift ? `translateX(${shift}px)` : undefined }}
          className="absolute left-0 top-full z-30 mt-2 block w-72 max-w-[calc(100vw-1rem)] rounded-md border border-teal bg-card p-3 text-left text-sm font-normal normal-case tracking-normal text-ink shadow-lg"
        >
          <span className="block font-semibold">{term.name}</span>
          <span className="mt-1 block">{term.text}</span>
        </span>
      )}
    </span>
  );
}
