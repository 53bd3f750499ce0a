import { useEffect, useId, useRef, type ReactNode } from 'react';
import { Button } from './button';

/**
 * The one confirmation for a step that cannot be taken back, or that takes
 * something away from someone. It says what will happen before it happens:
 * the title asks the question, the body spells out the consequence, and the
 * confirm button repeats the action in words ("Withdraw the ticket", never
 * "OK"). Cancel is the first button and has the focus, so Enter or a stray
 * tap changes nothing; Escape closes it too.
 */
export function ConfirmDialog({
  open,
  title,
  children,
  confirmLabel,
  cancelLabel = 'Cancel',
  tone = 'danger',
  pending = false,
  confirmDisabled = false,
  error,
  onConfirm,
  onCancel,
}: {
  open: boolean;
  title: ReactNode;
  children: ReactNode;
  confirmLabel: string;
  cancelLabel?: string;
  /** danger: destroys or takes away; primary: cannot be undone but harms nothing. */
  tone?: 'danger' | 'primary';
  pending?: boolean;
  confirmDisabled?: boolean;
  error?: ReactNode;
  onConfirm: () => void;
  onCancel: () => void;
}) {
  const ref = useRef<HTMLDialogElement>(null);
  const titleId = useId();
  const bodyId = useId();

  useEffect(() => {
    const dialog = ref.current;
    if (!dialog) return;
    if (open && !dialog.open) dialog.showModal();
    if (!open && dialog.open) dialog.close();
  }, [open]);

  return (
    <dialog
      ref={ref}
      aria-labelledby={titleId}
      aria-describedby={bodyId}
      onCancel={(e) => {
        e.preventDefault();
        if (!pending) onCancel();
      }}
      className="m-auto max-h-[calc(100dvh-2rem)] w-[calc(100%-2rem)] max-w-lg overflow-y-auto rounded-lg border-2 border-ink bg-card p-0 text-ink shadow-xl backdrop:bg-ink/60"
    >
      {open && (
        <div className="space-y-4 p-5">
          <h2 id={titleId} className="text-xl font-bold leading-tight">
            {title}
          </h2>
          <div id={bodyId} className="space-y-2 text-base">
            {children}
          </div>
          {error && <div className="rounded-md border-l-4 border-danger bg-danger-light px-3 py-2 text-sm">{error}</div>}
          <div className="flex flex-col-reverse gap-2 sm:flex-row sm:justify-end">
            <Button variant="secondary" autoFocus disabled={pending} onClick={onCancel}>
              {cancelLabel}
            </Button>
            <Button variant={tone} disabled={pending || confirmDisabled} onClick={onConfirm}>
              {pending ? 'Working…' : confirmLabel}
            </Button>
          </div>
        </div>
      )}
    </dialog>
  );
}
