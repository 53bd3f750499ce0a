import { useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { describeError } from '../../lib/api-client';
import { getMeQueryOptions } from '../auth/api/get-me';
import { logout } from '../auth/api/logout';
import { SignOutDialog } from './components/sign-out-dialog';
import { useDevice } from './device-context';
import { deviceDb, forgetUser } from './device-db';

/**
 * Signing out on a phone: the server ends the session, then the phone forgets
 * the field data it kept for this person. With items not yet sent, or with
 * no network, it asks first.
 */
export function useGuardedSignOut(onSignedOut: () => void) {
  const d = useDevice();
  const qc = useQueryClient();
  const [asking, setAsking] = useState(false);
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);

  const signOut = async (dropUnsent: boolean) => {
    setBusy(true);
    setError(null);
    try {
      await logout();
      await forgetUser(await deviceDb(), d.user.id, { dropUnsent });
      setAsking(false);
      qc.clear();
      qc.setQueryData(getMeQueryOptions().queryKey, null);
      onSignedOut();
    } catch (err) {
      setError(describeError(err));
      setAsking(true);
    } finally {
      setBusy(false);
    }
  };

  const request = () => {
    if (d.waiting.length || !d.online) setAsking(true);
    else void signOut(false);
  };

  const dialog = asking ? (
    <SignOutDialog
      waiting={d.waiting.length}
      online={d.online}
      busy={busy}
      error={error}
      onStay={() => setAsking(false)}
      onSignOut={(drop) => void signOut(drop)}
    />
  ) : null;
  return { request, dialog };
}
