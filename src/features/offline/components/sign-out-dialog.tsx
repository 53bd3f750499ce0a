import { useEffect, useRef } from 'react';
import { Button } from '../../../components/ui/button';
import { countOf } from '../../../lib/format';

/**
 * Signing out with work not yet sent: say so, and let the person choose to
 * stay, keep the items on the phone for their next sign-in, or delete them.
 */
export function SignOutDialog({
  waiting,
  online,
  busy,
  error,
  onStay,
  onSignOut,
}: {
  waiting: number;
  online: boolean;
  busy: boolean;
  error: string | null;
  onStay: () => void;
  onSignOut: (dropUnsent: boolean) => void;
}) {
  const ref = useRef<HTMLDialogElement>(null);
  useEffect(() => {
    const dialog = ref.current;
    if (dialog && !dialog.open) dialog.showModal();
  }, []);
  return (
    <dialog
      ref={ref}
      aria-labelledby="sign-out-title"
      className="m-auto w-[min(32rem,calc(100%-2rem))] rounded-lg border border-rule bg-card p-5 text-ink shadow-xl backdrop:bg-ink/50"
      onCancel={onStay}
    >
      <h2 id="sign-out-title" className="text-lg font-bold">
        {waiting ? `${countOf(waiting, 'item')} not sent yet` : 'Signing out needs the network'}
      </h2>
      {waiting > 0 && (
        <p className="mt-2 text-sm">
          {waiting === 1 ? 'It has' : 'They have'} not reached Rholog. Signing out also removes the sites, cable runs and cable
          library kept on this phone.
          {online ? ' Stay signed in to send them first, or choose what happens to them.' : ''}
        </p>
      )}
      {!online && (
        <p className="mt-2 text-sm">
          The phone is offline, and only the server can end the sign-in. Stay signed in for now
          {waiting ? ': what waits is sent when the network comes back' : ''}.
        </p>
      )}
      {error && (
        <p className="mt-2 text-sm font-semibold text-danger" role="alert">
          {error}
        </p>
      )}
      <div className="mt-4 grid gap-2">
        <Button onClick={onStay} autoFocus>
          Stay signed in
        </Button>
        {online && waiting > 0 && (
          <>
            <Button variant="secondary" disabled={busy} onClick={() => onSignOut(false)}>
              Sign out, keep them on this phone for my next sign-in
            </Button>
            <Button variant="danger" disabled={busy} onClick={() => onSignOut(true)}>
              Sign out and delete them
            </Button>
          </>
        )}
      </div>
    </dialog>
  );
}
