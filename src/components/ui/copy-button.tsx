import { useEffect, useRef, useState, type RefObject } from 'react';
import { Button } from './button';

/**
 * Copies a short text (a temporary password) to the clipboard, and says so. Where the
 * browser gives no clipboard (a page served over plain HTTP on a LAN address), the
 * text is selected instead, for the reader to copy with the system's own menu.
 */
export function CopyButton({ text, target, label = 'Copy' }: { text: string; target: RefObject<HTMLElement | null>; label?: string }) {
  const [state, setState] = useState<'idle' | 'copied' | 'selected'>('idle');
  const timer = useRef<ReturnType<typeof setTimeout> | null>(null);
  useEffect(() => () => void (timer.current && clearTimeout(timer.current)), []);

  const selectTarget = () => {
    const el = target.current;
    const sel = window.getSelection?.();
    if (!el || !sel) return false;
    const range = document.createRange();
    range.selectNodeContents(el);
    sel.removeAllRanges();
    sel.addRange(range);
    return true;
  };
  const copy = async () => {
    try {
      if (!navigator.clipboard) throw new Error('no clipboard');
      await navigator.clipboard.writeText(text);
      setState('copied');
    } catch {
      setState(selectTarget() ? 'selected' : 'idle');
    }
    if (timer.current) clearTimeout(timer.current);
    timer.current = setTimeout(() => setState('idle'), 4000);
  };
  return (
    <>
      <Button variant="secondary" onClick={() => void copy()}>
        {label}
      </Button>
      <span role="status" className="text-sm font-semibold" data-testid="copy-state">
        {state === 'copied' ? 'Copied' : state === 'selected' ? 'Selected: copy it with your device’s menu' : ''}
      </span>
    </>
  );
}
