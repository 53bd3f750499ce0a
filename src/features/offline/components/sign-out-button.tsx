import { useGuardedSignOut } from '../use-guarded-sign-out';

/** "Sign out", asking first when this phone still holds work not sent. */
export function SignOutButton({ onSignedOut, className }: { onSignedOut: () => void; className?: string }) {
  const { request, dialog } = useGuardedSignOut(onSignedOut);
  return (
    <>
      <button type="button" onClick={request} className={className}>
        Sign out
      </button>
      {dialog}
    </>
  );
}
